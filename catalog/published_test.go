package catalog

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/internal/sharedcat"
)

// publishedFixture builds a small stand-in for a published CDS table: the
// BSC5 fixture's lines padded with blanks to the V/50 record length (197
// bytes, the V/50 ReadMe's Lrecl), its gzip, and the Published figures
// that describe both, as KnownSources describes the real file.
func publishedFixture(t *testing.T) (table, gz []byte, pub Published) {
	t.Helper()
	raw, err := os.ReadFile(fixture("bsc5_good.dat"))
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	n := 0
	for _, l := range strings.Split(strings.TrimSuffix(string(raw), "\n"), "\n") {
		b.WriteString(l + strings.Repeat(" ", 197-len(l)) + "\n")
		n++
	}
	table = b.Bytes()
	var z bytes.Buffer
	zw := gzip.NewWriter(&z)
	zw.Write(table)
	zw.Close()
	gz = z.Bytes()
	ts, gs := sha256.Sum256(table), sha256.Sum256(gz)
	return table, gz, Published{Records: n, RecordLength: 197, Size: int64(len(table)), SHA256: hex.EncodeToString(ts[:]),
		GzipSize: int64(len(gz)), GzipSHA256: hex.EncodeToString(gs[:])}
}

func gzipOf(b []byte, level int) []byte {
	var z bytes.Buffer
	zw, _ := gzip.NewWriterLevel(&z, level)
	zw.Write(b)
	zw.Close()
	return z.Bytes()
}

// TestFetchChecksPublishedFile (issue 18 item 10): a download is checked
// against the published description of the file — record count and
// length, the table's size and SHA-256, the served gzip's size and
// SHA-256 — and a body that is truncated, oversized, of the wrong size or
// the wrong digest is refused (ErrVerify) leaving nothing in the cache
// directory, whatever the server's framing. The published figures also
// prove a close-delimited body complete (RFC 9112 §6.3), which without
// them is refused as unverifiable.
func TestFetchChecksPublishedFile(t *testing.T) {
	table, gz, pub := publishedFixture(t)
	lines := bytes.SplitAfter(table, []byte("\n"))
	twoMembers := append(gzipOf(bytes.Join(lines[:2], nil), gzip.DefaultCompression), gzipOf(bytes.Join(lines[2:], nil), gzip.DefaultCompression)...)
	firstMember := gzipOf(bytes.Join(lines[:2], nil), gzip.DefaultCompression)
	edited := bytes.Clone(table)
	edited[100] = 'X' // same records, same length, another digest
	shortRecord := bytes.Join([][]byte{lines[0][:150], []byte("\n"), bytes.Join(lines[1:], nil)}, nil)
	extraRecord := append(bytes.Clone(table), lines[0]...)
	lenHead := func(n int) string {
		return "HTTP/1.1 200 OK\r\nConnection: close\r\nContent-Length: " + strconv.Itoa(n) + "\r\n\r\n"
	}
	closeHead := "HTTP/1.1 200 OK\r\nConnection: close\r\n\r\n"
	serve := func(head string, body []byte) string { return rawServer(t, head, body) }
	withPin := func(b []byte) FetchOptions {
		s := sha256.Sum256(b)
		return FetchOptions{SHA256: hex.EncodeToString(s[:])}
	}

	refused := []struct {
		name   string
		url    string
		mirror bool
		opt    FetchOptions
		want   error  // besides ErrVerify
		msg    string // in the message
	}{
		{"close-delimited gzip cut at a member boundary", serve(closeHead, firstMember), false, FetchOptions{}, ErrTruncated, "records"},
		{"close-delimited gzip cut inside the stream", serve(closeHead, gz[:len(gz)-30]), false, FetchOptions{}, ErrTruncated, "ends early"},
		{"close-delimited plain table cut at a record end", serve(closeHead, bytes.Join(lines[:3], nil)), true, FetchOptions{}, ErrTruncated, "records"},
		{"close-delimited plain table cut inside a record", serve(closeHead, table[:len(table)-40]), true, FetchOptions{}, ErrTruncated, "without a line feed"},
		{"Content-Length matching a cut gzip body", serve(lenHead(len(firstMember)), firstMember), false, FetchOptions{}, ErrTruncated, "records"},
		{"oversized: junk after the gzip file", serve(closeHead, append(bytes.Clone(gz), make([]byte, 4000)...)), false, FetchOptions{}, nil, "bytes expected"},
		{"oversized: announced longer than the published file", serve(lenHead(len(table)*3), bytes.Repeat(table, 3)), false, FetchOptions{}, nil, "announces"},
		{"oversized: one record too many", serve(lenHead(len(extraRecord)), extraRecord), true, FetchOptions{}, nil, "more than the"},
		{"wrong size: a record shorter than published", serve(lenHead(len(shortRecord)), shortRecord), true, FetchOptions{}, nil, "published record length is 197"},
		{"wrong size: the gzip file compressed otherwise", serve(lenHead(len(gzipOf(table, gzip.HuffmanOnly))), gzipOf(table, gzip.HuffmanOnly)), false, FetchOptions{}, nil, "the gzip file has"},
		{"wrong digest: the table edited", serve(lenHead(len(gzipOf(edited, gzip.DefaultCompression))), gzipOf(edited, gzip.DefaultCompression)), false, FetchOptions{}, nil, "another edition"},
		{"wrong digest from a mirror, plain", serve(lenHead(len(edited)), edited), true, FetchOptions{}, nil, "table's SHA-256"},
		{"a pinned digest keeps the record checks", serve(lenHead(len(shortRecord)), shortRecord), true, withPin(shortRecord), nil, "record length"},
	}
	for _, c := range refused {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			dst := filepath.Join(dir, "bsc5.dat.gz")
			opt := c.opt
			p := pub
			opt.Published, opt.Mirror, opt.Format = &p, c.mirror, FormatBSC5
			err := FetchWith(context.Background(), nil, c.url, dst, nil, opt)
			if err == nil {
				t.Fatal("accepted")
			}
			if !errors.Is(err, ErrVerify) || (c.want != nil && !errors.Is(err, c.want)) || !strings.Contains(err.Error(), c.msg) {
				t.Errorf("error %q, want ErrVerify and %v, saying %q", err, c.want, c.msg)
			}
			if ents, _ := os.ReadDir(dir); len(ents) != 0 {
				t.Errorf("left behind: %v", ents)
			}
		})
	}

	accepted := []struct {
		name   string
		url    string
		mirror bool
		opt    FetchOptions
	}{
		{"the published gzip, Content-Length", serve(lenHead(len(gz)), gz), false, FetchOptions{}},
		{"the published gzip, close-delimited", serve(closeHead, gz), false, FetchOptions{}},
		{"a mirror's gzip in two members", serve(closeHead, twoMembers), true, FetchOptions{}},
		{"a mirror's plain table", serve(lenHead(len(table)), table), true, FetchOptions{}},
		{"another edition, pinned", serve(lenHead(len(edited)), edited), true, withPin(edited)},
	}
	for _, c := range accepted {
		t.Run(c.name, func(t *testing.T) {
			dst := filepath.Join(t.TempDir(), "bsc5.dat.gz")
			opt := c.opt
			p := pub
			opt.Published, opt.Mirror, opt.Format = &p, c.mirror, FormatBSC5
			if err := FetchWith(context.Background(), nil, c.url, dst, nil, opt); err != nil {
				t.Fatal(err)
			}
			if s, _, err := Open(dst, ReadOptions{}); err != nil || s.Len() != 3 {
				t.Errorf("fetched file: %v", err)
			}
		})
	}

	// Without published figures the same close-delimited body cannot be
	// proved complete.
	err := FetchWith(context.Background(), nil, serve(closeHead, gz), filepath.Join(t.TempDir(), "x.gz"), nil, FetchOptions{})
	if !errors.Is(err, ErrUnverifiable) {
		t.Errorf("no published figures: %v, want ErrUnverifiable", err)
	}
}

// TestFetchSourceMirror: FetchSource applies the served gzip's figures
// only at the publisher's own address; from another address (a mirror)
// the table's figures alone decide.
func TestFetchSourceMirror(t *testing.T) {
	table, _, pub := publishedFixture(t)
	recompressed := gzipOf(table, gzip.BestSpeed)
	url := rawServer(t, "HTTP/1.1 200 OK\r\nConnection: close\r\nContent-Length: "+strconv.Itoa(len(recompressed))+"\r\n\r\n", recompressed)
	src := Source{Name: "bsc5", URL: url, File: "bsc5.dat.gz", Format: FormatBSC5, Published: pub}
	dir := t.TempDir()
	if err := FetchSource(context.Background(), nil, src, "", filepath.Join(dir, "a.gz"), nil, FetchOptions{}); !errors.Is(err, ErrVerify) {
		t.Errorf("recompressed file at the publisher's address: %v, want ErrVerify", err)
	}
	mirror := src
	mirror.URL = "https://archive.invalid/catalog.gz"
	if err := FetchSource(context.Background(), nil, mirror, url, filepath.Join(dir, "b.gz"), nil, FetchOptions{}); err != nil {
		t.Errorf("same table from a mirror: %v", err)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 || ents[0].Name() != "b.gz" {
		t.Errorf("directory holds %v, want only b.gz", ents)
	}
}

// TestKnownSourcesPublished checks the recorded figures for consistency
// and against the real data beside the project: the V/50 ReadMe's record
// length (197) bounds every line of shared/catalogs/bsc5.dat, whose 9096
// records plus the 14 entries its README lists as removed make the
// ReadMe's 9110 (HR 1 to 9110, each once).
func TestKnownSourcesPublished(t *testing.T) {
	hex64 := regexp.MustCompile(`^[0-9a-f]{64}$`)
	for k, s := range KnownSources {
		p := s.Published
		if p.Records <= 0 || p.Source == "" {
			t.Errorf("%s: no published record count or source: %+v", k, p)
		}
		if p.RecordLength > 0 && p.Size != int64(p.Records)*int64(p.RecordLength+1) {
			t.Errorf("%s: size %d, want %d records × (%d + 1)", k, p.Size, p.Records, p.RecordLength)
		}
		for _, d := range []string{p.SHA256, p.GzipSHA256} {
			if d != "" && !hex64.MatchString(d) {
				t.Errorf("%s: digest %q is not 64 lower-case hex digits", k, d)
			}
		}
	}
	b := KnownSources["bsc5"].Published
	if b.Records != 9110 || b.RecordLength != 197 || b.Size != 1803780 || b.GzipSize != 573921 {
		t.Errorf("bsc5: %+v", b)
	}

	path := sharedcat.BSC5(t)
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	removed := map[int]bool{92: true, 95: true, 182: true, 1057: true, 1841: true, 2472: true, 2496: true,
		3515: true, 3671: true, 6309: true, 6515: true, 7189: true, 7539: true, 8296: true} // shared/catalogs/README.md
	seen := map[int]bool{}
	sc := bufio.NewScanner(f)
	n := 0
	for sc.Scan() {
		n++
		l := sc.Text()
		if len(l) > b.RecordLength {
			t.Errorf("line %d has %d bytes, more than the ReadMe's Lrecl %d", n, len(l), b.RecordLength)
		}
		hr, err := strconv.Atoi(strings.TrimSpace(l[:4]))
		if err != nil || hr < 1 || hr > b.Records || seen[hr] || removed[hr] {
			t.Errorf("line %d: HR %q out of place", n, l[:4])
		}
		seen[hr] = true
	}
	if n+len(removed) != b.Records {
		t.Errorf("%d records + %d removed = %d, the ReadMe says %d", n, len(removed), n+len(removed), b.Records)
	}
	// The shared copy is trimmed, so it is not the published file: Verify
	// says so rather than accepting it.
	if err := b.Verify(path, true); !errors.Is(err, ErrVerify) {
		t.Errorf("trimmed shared copy: %v, want ErrVerify", err)
	}
}
