package names

import (
	"context"
	"fmt"
	"net/http"

	"github.com/skyframe/skyframe/catalog"
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
// WGSN updates the file in place as names are adopted (the copy in
// ../shared/catalogs is the edition of 2018-09-07; public notes seen on
// 2026-12-02 cite an edition of 2022-04-04 with 451 names), and no size,
// line count or digest of any edition is published, so none is pinned
// here: Fetch checks the content instead (see Fetch), and a user can pin
// the digest a fetch prints (`catalog fetch names --sha256`).
var Published = Source{
	URL:  "https://www.pas.rochester.edu/~emamajek/WGSN/IAU-CSN.txt",
	File: "iau-csn.txt",
}

// MaxFetchBytes bounds a download; the 2018 table is about 40 kB.
const MaxFetchBytes = 4 << 20

// ErrVerify: the downloaded file is not the names table it should be
// (the downloader's catalog.ErrVerify).
var ErrVerify = catalog.ErrVerify

// checkValues are entries every published version of the table holds
// (names adopted in 2016, never withdrawn), as shared/catalogs/README.md
// lists them: a download that lacks one is not the table.
var checkValues = []struct {
	name string
	hr   int
}{{"Betelgeuse", 2061}, {"Sirius", 2491}, {"Vega", 7001}, {"Rigil Kentaurus", 5459}}

// Fetch downloads src.URL (url, when not empty, instead: a mirror) into
// dst with the catalogue downloader (catalog.FetchWith: complete by the
// server's length or a chunked end, at most MaxFetchBytes, src.Size and
// src.SHA256 when set, written to a temporary file beside dst). The file
// must then read as an IAU-CSN table (Read) and hold the check values
// (Betelgeuse HR 2061, Sirius HR 2491, Vega HR 7001, Rigil Kentaurus
// HR 5459); only then is it renamed into place, so dst is either the old
// file or a verified new one. It returns the hex SHA-256 of the accepted
// file, which a caller can pin as src.SHA256 for later fetches. Every
// refusal of the file's content wraps ErrVerify. client nil means
// http.DefaultClient.
func Fetch(ctx context.Context, client *http.Client, src Source, url, dst string) (digest string, err error) {
	if url == "" {
		url = src.URL
	}
	check := func(ctx context.Context, path string) error {
		t, err := ReadFile(path)
		if err != nil {
			return err
		}
		byName := map[string]Entry{}
		for _, e := range t.Entries {
			byName[e.Name] = e
		}
		for _, c := range checkValues {
			if e, ok := byName[c.name]; !ok || e.HR != c.hr {
				return fmt.Errorf("no entry %s (HR %d); not the IAU Catalog of Star Names", c.name, c.hr)
			}
		}
		return nil
	}
	err = catalog.FetchWith(ctx, client, url, dst, nil, catalog.FetchOptions{
		Size: src.Size, SHA256: src.SHA256, Digest: &digest,
		MaxBytes: MaxFetchBytes, Check: check,
	})
	if err != nil {
		return "", fmt.Errorf("names: %w", err)
	}
	return digest, nil
}
