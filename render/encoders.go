package render

import "github.com/skyframe/skyframe/imgfile"

// The file encoders (PNG, FITS with WCS) live in package imgfile, which uses
// no render types. These aliases keep callers that still name them through
// render compiling while they move over; new code uses package imgfile.
type (
	// Card is imgfile.Card.
	Card = imgfile.Card
	// KV is imgfile.KV.
	KV = imgfile.KV
	// FITSHeader is imgfile.FITSHeader.
	FITSHeader = imgfile.FITSHeader
	// FITSMeta is imgfile.FITSMeta.
	FITSMeta = imgfile.FITSMeta
	// PNGEncoder is imgfile.PNGEncoder.
	PNGEncoder = imgfile.PNGEncoder
)

// ErrNoWCS is imgfile.ErrNoWCS.
var ErrNoWCS = imgfile.ErrNoWCS

// Functions moved to package imgfile.
var (
	WriteFITS      = imgfile.WriteFITS
	WritePNG       = imgfile.WritePNG
	ReadFITSHeader = imgfile.ReadFITSHeader
	SortedKV       = imgfile.SortedKV
	WCSCards       = imgfile.WCSCards
)
