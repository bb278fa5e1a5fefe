package catalog

import (
	"bytes"
	"compress/gzip"
	"errors"
	"io"
	"strings"
	"testing"
)

// byteCounter counts the bytes handed out by r.
type byteCounter struct {
	r io.Reader
	n int64
}

func (c *byteCounter) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	return n, err
}

// A line with no end (endless, read_test.go) — the shape of a 2 GB line —
// is refused once it passes MaxLineBytes, having read little more than
// that: the readers do not buffer or scan the whole line. TestHostileInput
// checks the error for one CSV; this checks the bytes read, for every text
// format, forced and detected, filled with NULs, spaces and digits.
func TestEndlessLineStopsAtLimit(t *testing.T) {
	heads := []struct {
		format Format
		head   string
	}{
		{FormatAuto, "id,ra,dec,vmag\n1,10,20,3\n"},
		{FormatCSV, "id,ra,dec,vmag\n"},
		{FormatTSV, "ra\tdec\tvmag\n"},
		{FormatGaiaCSV, "source_id,ra,dec,parallax,phot_g_mean_mag,bp_rp\n"},
		{FormatBSC5, ""},
		{FormatHipparcos, "H|"},
		{FormatHipparcos2007, ""},
	}
	const limit = 1 << 20 // DefaultMaxLineBytes
	for _, h := range heads {
		for _, fill := range []byte{0, ' ', '7'} {
			cr := &byteCounter{r: io.MultiReader(strings.NewReader(h.head), endless(fill))}
			_, _, err := Read(cr, "endless", ReadOptions{Format: h.format})
			if !errors.Is(err, ErrLineTooLong) && !(h.format == FormatAuto && fill == 0 && errors.Is(err, ErrUnknownFormat)) {
				t.Errorf("%v, fill %q: err %v, want %v", h.format, fill, err, ErrLineTooLong)
			}
			var pe *ParseError
			if errors.As(err, &pe) && (pe.File != "endless" || pe.Line < 1) {
				t.Errorf("%v, fill %q: error %q does not name file and line", h.format, fill, err)
			}
			t.Logf("%v, fill %q: %v after %d bytes", h.format, fill, err, cr.n)
			// Slack for the reader's buffer and the sniffer's look-ahead:
			// 128 KiB [cp: bufio and sniff buffers are tens of KiB; measured:
			// 64 KiB of sniff look-ahead when detecting].
			if max := int64(len(h.head)) + limit + 128<<10; cr.n > max {
				t.Errorf("%v, fill %q: read %d bytes of an endless line, want ≤ %d", h.format, fill, cr.n, max)
			}
		}
	}
}

// A gzip stream of good rows that never ends is refused by the inflation
// limits, reading a bounded amount of compressed input. With -short the
// size limit is set low so the race detector run stays fast; otherwise the
// default ratio limit (100× after 8 MiB, doc.go) does the work.
func TestEndlessGzipStops(t *testing.T) {
	pr, pw := io.Pipe()
	go func() {
		zw := gzip.NewWriter(pw)
		zw.Write([]byte("id,ra,dec,vmag\n"))
		row := bytes.Repeat([]byte("1,10,20,3\n"), 1<<10)
		for {
			if _, err := zw.Write(row); err != nil {
				return
			}
		}
	}()
	defer pr.Close()
	opt := ReadOptions{}
	if testing.Short() {
		opt.MaxDecompressedBytes = 1 << 20
	}
	cr := &byteCounter{r: pr}
	_, _, err := Read(cr, "endless.csv.gz", opt)
	if !errors.Is(err, ErrDecompressedTooLarge) {
		t.Fatalf("err %v, want %v", err, ErrDecompressedTooLarge)
	}
	t.Logf("refused after %d compressed bytes: %v", cr.n, err)
	// The ratio limit trips once 8 MiB are inflated at a ratio above 100,
	// i.e. before 8 MiB/100 ≈ 84 KB of input; allow 1 MiB for buffering.
	if cr.n > 1<<20 {
		t.Errorf("read %d compressed bytes before refusing", cr.n)
	}
}

// A declared row count is refused before the rows are read: the reader
// does not get past the first lines.
func TestDeclaredRowsRefusedEarly(t *testing.T) {
	for _, head := range []string{
		"# rows: 1000000000\nid,ra,dec,vmag\n",
		"# rows: 1000000000\nsource_id,ra,dec,parallax,phot_g_mean_mag,bp_rp\n",
	} {
		body := head + strings.Repeat("1,10,20,3,4,0.5\n", 1<<16) // 1 MiB of rows
		cr := &byteCounter{r: strings.NewReader(body)}
		_, _, err := Read(cr, "rows.csv", ReadOptions{})
		if !errors.Is(err, ErrTooManyRows) {
			t.Fatalf("err %v, want %v", err, ErrTooManyRows)
		}
		var pe *ParseError
		if !errors.As(err, &pe) || pe.Line != 1 || pe.Field != "rows" {
			t.Errorf("error %q should name line 1, field rows", err)
		}
		if cr.n >= int64(len(body)) {
			t.Errorf("read all %d bytes before refusing the declared count", cr.n)
		}
	}
}
