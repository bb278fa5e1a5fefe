package catalog

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"
)

// Published is what is known of a file as its publisher serves it, so that
// a download can be checked against it (FetchOptions.Published). Each
// figure is optional (zero: unknown); Source says where each one comes
// from and when it was read.
//
// A table is described in two forms, as a fetch sees them: the served
// file (the archive's gzip, GzipSize and GzipSHA256) and the table it
// inflates to (Records, RecordLength, Size, SHA256). A file that is not
// gzip is checked as the table itself, so a mirror serving the table
// uncompressed passes the same checks.
type Published struct {
	// Records is the number of records (lines, each ended by a line feed)
	// of the table: the "Records" column of a CDS ReadMe's File Summary.
	Records int
	// RecordLength, when > 0, is the length in bytes of every record
	// without its line feed: the CDS ReadMe's "Lrecl" for a table whose
	// records are padded with blanks to that length.
	RecordLength int
	// Size is the length in bytes of the table, line feeds included
	// (Records × (RecordLength + 1) for fixed-length records).
	Size int64
	// SHA256 is the hex SHA-256 of the table.
	SHA256 string
	// GzipSize and GzipSHA256 describe the gzip file as the archive
	// serves it (a mirror may compress the same table differently, so
	// Fetch applies them only to the archive's own address).
	GzipSize   int64
	GzipSHA256 string
	// Source cites the figures: documents, their dates, and how each
	// figure follows from them.
	Source string
}

// exact reports whether p pins the table's end, so that a download whose
// end the server does not mark (a close-delimited body) can still be
// proved complete by Verify.
func (p *Published) exact() bool {
	return p != nil && (p.Records > 0 || p.Size > 0 || p.SHA256 != "" || p.GzipSize > 0 || p.GzipSHA256 != "")
}

// maxServed is the largest number of bytes a download of p can have (0:
// unknown): the gzip file or, from a mirror serving it plain, the table.
func (p *Published) maxServed(served bool) int64 {
	switch {
	case p == nil:
		return 0
	case p.Size > 0 && served:
		return max(p.Size, p.GzipSize)
	case p.Size > 0:
		// A mirror may serve the table in a gzip of its own: deflate's
		// stored blocks add 5 bytes per 64 KiB (RFC 1951 §3.2.4), so a
		// thousandth and a header's allowance bound it.
		return p.Size + p.Size/1000 + 1024
	case served:
		return p.GzipSize
	}
	return 0
}

// Verify checks the file at path against p. The table comes first: if
// the file is gzip (RFC 1952 magic bytes) it is inflated, every member to
// its end with its CRC-32 and length checked, otherwise the file is the
// table. The table must have Records records each ended by a line feed,
// each RecordLength bytes long, Size bytes in all and the SHA-256 SHA256,
// each when given. Then, for a gzip file that came from the publisher's
// own address (served), the file's length and SHA-256 must be GzipSize
// and GzipSHA256. A failure wraps ErrVerify, and ErrTruncated too when the
// table ends early.
func (p Published) Verify(path string, served bool) error {
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	raw := sha256.New()
	var rawSize int64
	br := bufio.NewReaderSize(io.TeeReader(f, writerFunc(func(b []byte) (int, error) {
		rawSize += int64(len(b))
		return raw.Write(b)
	})), 64<<10)
	magic, _ := br.Peek(2)
	gz := len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b
	var table io.Reader = br
	if gz {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return p.refuse(ErrVerify, "gzip: %v", err)
		}
		defer zr.Close()
		table = zr
	} else if served && p.GzipSize > 0 && p.Size <= 0 {
		return p.refuse(ErrVerify, "not a gzip file; the publisher serves gzip")
	}
	// Read at most one byte more than the table may have, so that a gzip
	// bomb or an oversized body stops early.
	if p.Size > 0 {
		table = io.LimitReader(table, p.Size+1)
	}
	h := sha256.New()
	var size int64
	records, line := 0, 0
	buf := make([]byte, 64<<10)
	for {
		n, rerr := table.Read(buf)
		chunk := buf[:n]
		h.Write(chunk)
		size += int64(n)
		for len(chunk) > 0 {
			i := bytes.IndexByte(chunk, '\n')
			if i < 0 {
				line += len(chunk)
				break
			}
			line += i
			records++
			if p.RecordLength > 0 && line != p.RecordLength {
				return p.refuse(ErrVerify, "record %d has %d bytes, the published record length is %d", records, line, p.RecordLength)
			}
			if p.Records > 0 && records > p.Records {
				return p.refuse(ErrVerify, "more than the %d published records", p.Records)
			}
			line = 0
			chunk = chunk[i+1:]
		}
		if rerr == io.EOF {
			break
		}
		if rerr != nil {
			if errors.Is(rerr, io.ErrUnexpectedEOF) {
				return p.refuse(fmt.Errorf("%w: %w", ErrVerify, ErrTruncated), "the gzip stream ends early, after %d bytes of the table", size)
			}
			return p.refuse(ErrVerify, "%v", rerr)
		}
	}
	switch {
	case p.Size > 0 && size > p.Size:
		return p.refuse(ErrVerify, "the table has more than the %d published bytes", p.Size)
	case p.Records > 0 && line > 0:
		return p.refuse(fmt.Errorf("%w: %w", ErrVerify, ErrTruncated), "the table ends inside record %d (%d bytes without a line feed)", records+1, line)
	case p.Records > 0 && records < p.Records:
		return p.refuse(fmt.Errorf("%w: %w", ErrVerify, ErrTruncated), "the table has %d records, the published one %d", records, p.Records)
	case p.Size > 0 && size < p.Size:
		return p.refuse(fmt.Errorf("%w: %w", ErrVerify, ErrTruncated), "the table has %d bytes, the published one %d", size, p.Size)
	}
	// The table's structure matches; a digest alone differing points to
	// another edition of the same table.
	other := ""
	if p.Records > 0 || p.Size > 0 {
		other = " (its records and length are as published: another edition? check it and pin its SHA-256 to accept it)"
	}
	if p.SHA256 != "" {
		if got := hex.EncodeToString(h.Sum(nil)); got != strings.ToLower(p.SHA256) {
			return p.refuse(ErrVerify, "the table's SHA-256 is %s, the published one's %s%s", got, p.SHA256, other)
		}
	}
	if !gz || !served || (p.GzipSize <= 0 && p.GzipSHA256 == "") {
		return nil
	}
	if _, err := io.Copy(io.Discard, br); err != nil {
		return err
	}
	if p.GzipSize > 0 && rawSize != p.GzipSize {
		return p.refuse(ErrVerify, "the gzip file has %d bytes, the published one %d%s", rawSize, p.GzipSize, other)
	}
	if p.GzipSHA256 != "" {
		if got := hex.EncodeToString(raw.Sum(nil)); got != strings.ToLower(p.GzipSHA256) {
			return p.refuse(ErrVerify, "the gzip file's SHA-256 is %s, the published one's %s%s", got, p.GzipSHA256, other)
		}
	}
	return nil
}

// writerFunc adapts a function to io.Writer.
type writerFunc func([]byte) (int, error)

func (w writerFunc) Write(b []byte) (int, error) { return w(b) }

// refuse formats a verification failure, wrapping kind.
func (Published) refuse(kind error, format string, args ...any) error {
	return fmt.Errorf("%w: "+format, append([]any{kind}, args...)...)
}
