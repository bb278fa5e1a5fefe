package job

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"regexp"

	"github.com/skyframe/skyframe/render"
)

// Sidecar is the JSON written next to each flight frame: the still
// sidecar's physical state plus where the frame sits in the flight.
type Sidecar struct {
	render.Sidecar
	Flight Info `json:"flight"`
}

// Info locates a frame in its flight. Times are Julian years, distances
// parsecs, rates received signals per emitted second (the Doppler factor
// toward the trajectory's start and end points).
type Info struct {
	Title    string `json:"title,omitempty"`
	PlanHash string `json:"plan_hash"` // Job.Hash: every input's identity
	// Inputs are the identities PlanHash is made of (see Inputs).
	Inputs        map[string]string `json:"inputs,omitempty"`
	Frame         int               `json:"frame"`
	Frames        int               `json:"frames"`
	Phase         string            `json:"phase"`
	VideoSeconds  float64           `json:"video_s"`
	ShipYears     float64           `json:"tau_yr"`
	CatalogueYrs  float64           `json:"t_yr"`
	RateHome      float64           `json:"rate_home"`
	RateDest      float64           `json:"rate_dest"`
	TravelledPc   float64           `json:"travelled_pc"`
	RemainingPc   float64           `json:"remaining_pc"`
	LookKey       string            `json:"look_key"`
	RollDeg       float64           `json:"roll_deg"`
	MeanLuminance float64           `json:"mean_luminance"`
	// RegionLuminance holds the mean relative luminance of each of the
	// Regions² overlapping windows (see MeanLuminance), row by row.
	RegionLuminance []float64 `json:"region_luminance,omitempty"`
	// Shutter is the shutter angle in degrees; BlurKnots the instants of
	// the exposure its stars were transformed at (0: the frame's instant
	// alone, see PlanExposure), BlurPathPx the longest on-screen path of
	// the probe grid over the exposure, pixels.
	Shutter    float64      `json:"shutter_deg"`
	BlurKnots  int          `json:"blur_knots"`
	BlurPathPx float64      `json:"blur_path_px"`
	Files      []FileRecord `json:"files"`
}

// FileRecord names an image file of the frame (relative to the output
// directory, slash-separated) with its size and SHA-256.
type FileRecord struct {
	Kind   string `json:"kind"` // "png", "fits", "exr" or "overlay"
	Name   string `json:"name"`
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// A sealed sidecar is the indented JSON object (json.MarshalIndent with
// two spaces) with one more member, last:
//
//	"sidecar_sha256": "<SHA-256 of the object as it was without it>"
//
// so that any edit of the file — a flipped digit in a stored luminance, a
// changed checksum of an image — is detected by verification and resume,
// which trust nothing a sidecar says before its seal checks out.
const sealKey = "sidecar_sha256"

var sealRe = regexp.MustCompile(`,\n  "` + sealKey + `": "([0-9a-f]{64})"\n}\n?$`)

// Seal adds the seal member to an indented JSON object.
func Seal(obj []byte) []byte {
	sum := sha256.Sum256(obj)
	body := bytes.TrimSuffix(obj, []byte("\n}"))
	out := append([]byte(nil), body...)
	out = append(out, ",\n  \""+sealKey+"\": \""+hex.EncodeToString(sum[:])+"\"\n}"...)
	return out
}

// Errors of CheckSeal.
var (
	ErrNoSeal     = errors.New("no " + sealKey + " seal (written by an older version, or edited)")
	ErrSealBroken = errors.New("edited after it was written (" + sealKey + " does not match)")
)

// CheckSeal verifies a sealed JSON object.
func CheckSeal(data []byte) error {
	m := sealRe.FindSubmatchIndex(data)
	if m == nil {
		return ErrNoSeal
	}
	body := append(append([]byte(nil), data[:m[0]]...), "\n}"...)
	sum := sha256.Sum256(body)
	if hex.EncodeToString(sum[:]) != string(data[m[2]:m[3]]) {
		return ErrSealBroken
	}
	return nil
}
