package names

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"net/http"
	"os"
	"path/filepath"
	"strings"
)

// Source is where the names table is published.
type Source struct {
	URL  string // HTTPS address
	File string // file name in the user cache directory
	// Size and SHA256 (hex) of the published file, checked when set.
	Size   int64
	SHA256 string
}

// Published is the IAU-CSN text table as the WGSN publishes it (the
// address linked from the IAU's star-names pages; quoted from memory). The
// WGSN updates the file as names are adopted, so its size and hash are not
// pinned here (no published digest could be established offline); Fetch
// checks the content instead (see Fetch), and a user can pin the digest a
// fetch prints (`catalog fetch names --sha256`).
var Published = Source{
	URL:  "https://www.pas.rochester.edu/~emamajek/WGSN/IAU-CSN.txt",
	File: "iau-csn.txt",
}

// MaxFetchBytes bounds a download; the 2018 table is about 40 kB.
const MaxFetchBytes = 4 << 20

// ErrVerify: the downloaded file is not the names table it should be.
var ErrVerify = errors.New("names: fetch: download failed verification")

// checkValues are entries every published version of the table holds
// (names adopted in 2016, never withdrawn), as shared/catalogs/README.md
// lists them: a download that lacks one is not the table.
var checkValues = []struct {
	name string
	hr   int
}{{"Betelgeuse", 2061}, {"Sirius", 2491}, {"Vega", 7001}, {"Rigil Kentaurus", 5459}}

// Fetch downloads src.URL (url, when not empty, instead: a mirror) into
// dst. The body is held in memory (at most MaxFetchBytes), must be as long
// as the server's Content-Length, match src.Size and src.SHA256 when they
// are set, read as an IAU-CSN table (Read) and hold the check values
// (Betelgeuse HR 2061, Sirius HR 2491, Vega HR 7001, Rigil Kentaurus
// HR 5459); only then is it written to a temporary file beside dst and
// renamed into place, so dst is either the old file or a verified new one.
// It returns the hex SHA-256 of the accepted file, which a caller can pin
// as src.SHA256 for later fetches. client nil means http.DefaultClient.
func Fetch(ctx context.Context, client *http.Client, src Source, url, dst string) (digest string, err error) {
	if client == nil {
		client = http.DefaultClient
	}
	if url == "" {
		url = src.URL
	}
	req, err := http.NewRequestWithContext(ctx, http.MethodGet, url, nil)
	if err != nil {
		return "", fmt.Errorf("names: fetch: %w", err)
	}
	resp, err := client.Do(req)
	if err != nil {
		return "", fmt.Errorf("names: fetch: %w", err)
	}
	defer resp.Body.Close()
	if resp.StatusCode != http.StatusOK {
		return "", fmt.Errorf("names: fetch %s: HTTP status %s", url, resp.Status)
	}
	body, err := io.ReadAll(io.LimitReader(resp.Body, MaxFetchBytes+1))
	if err != nil {
		return "", fmt.Errorf("%w: %s: %w", ErrVerify, url, err)
	}
	if len(body) > MaxFetchBytes {
		return "", fmt.Errorf("%w: %s: more than %d bytes", ErrVerify, url, MaxFetchBytes)
	}
	if resp.ContentLength >= 0 && int64(len(body)) != resp.ContentLength {
		return "", fmt.Errorf("%w: %s: got %d of %d bytes", ErrVerify, url, len(body), resp.ContentLength)
	}
	if src.Size > 0 && int64(len(body)) != src.Size {
		return "", fmt.Errorf("%w: %s: %d bytes, want %d", ErrVerify, url, len(body), src.Size)
	}
	sum := sha256.Sum256(body)
	digest = hex.EncodeToString(sum[:])
	if want := strings.ToLower(strings.TrimSpace(src.SHA256)); want != "" {
		if h := digest; h != want {
			return "", fmt.Errorf("%w: %s: SHA-256 %s, want %s", ErrVerify, url, h, src.SHA256)
		}
	}
	t, rerr := Read(bytes.NewReader(body), url)
	if rerr != nil {
		return "", fmt.Errorf("%w: %v", ErrVerify, rerr)
	}
	byName := map[string]Entry{}
	for _, e := range t.Entries {
		byName[e.Name] = e
	}
	for _, c := range checkValues {
		if e, ok := byName[c.name]; !ok || e.HR != c.hr {
			return "", fmt.Errorf("%w: %s: no entry %s (HR %d); not the IAU Catalog of Star Names", ErrVerify, url, c.name, c.hr)
		}
	}
	dir := filepath.Dir(dst)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", fmt.Errorf("names: fetch: %w", err)
	}
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(dst)+".*.part")
	if err != nil {
		return "", fmt.Errorf("names: fetch: %w", err)
	}
	_, werr := tmp.Write(body)
	if werr == nil {
		werr = tmp.Sync()
	}
	if cerr := tmp.Close(); werr == nil {
		werr = cerr
	}
	if werr == nil {
		werr = os.Rename(tmp.Name(), dst)
	}
	if werr != nil {
		os.Remove(tmp.Name())
		return "", fmt.Errorf("names: fetch: %w", werr)
	}
	return digest, nil
}
