package catalog

import (
	"context"

	"fmt"
	"io"
	"net/http"
	"os"
	"path"
	"path/filepath"
)

// Source describes a catalogue that Fetch can download.
type Source struct {
	Name        string // key in KnownSources
	URL         string // HTTPS address at the CDS archive
	File        string // file name used in the cache directory
	Format      Format
	Description string
}

// KnownSources lists the catalogues `skyframe catalog` can download, by the
// file names of the CDS (Strasbourg astronomical Data Centre) FTP tree
// served over HTTPS at https://cdsarc.cds.unistra.fr/ftp/:
//   - "bsc5": V/50, the Bright Star Catalogue, 5th Revised Ed. (Hoffleit &
//     Warren 1991), file catalog.gz (9110 entries, ≈ 0.5 MB);
//   - "hipparcos": I/239, the Hipparcos Catalogue (ESA 1997), main file
//     hip_main.dat.gz (118 218 entries, ≈ 13 MB);
//   - "hipparcos2007": I/311, Hipparcos, the New Reduction (van Leeuwen
//     2007), hip2.dat.gz (117 955 entries).
var KnownSources = map[string]Source{
	"bsc5": {Name: "bsc5", URL: "https://cdsarc.cds.unistra.fr/ftp/V/50/catalog.gz", File: "bsc5.dat.gz",
		Format: FormatBSC5, Description: "Bright Star Catalogue, 5th Revised Ed. (CDS V/50)"},
	"hipparcos": {Name: "hipparcos", URL: "https://cdsarc.cds.unistra.fr/ftp/I/239/hip_main.dat.gz", File: "hip_main.dat.gz",
		Format: FormatHipparcos, Description: "The Hipparcos Catalogue, ESA 1997 (CDS I/239)"},
	"hipparcos2007": {Name: "hipparcos2007", URL: "https://cdsarc.cds.unistra.fr/ftp/I/311/hip2.dat.gz", File: "hip2.dat.gz",
		Format: FormatHipparcos2007, Description: "Hipparcos, the New Reduction, van Leeuwen 2007 (CDS I/311)"},
}

// CachePath returns where the source is kept: CacheDir()/File.
func (s Source) CachePath() (string, error) {
	d, err := CacheDir()
	if err != nil {
		return "", err
	}
	return filepath.Join(d, s.File), nil
}

// MaxDownloadBytes bounds what Fetch writes to disk.
const MaxDownloadBytes = 1 << 30

// CacheDir returns the directory for downloaded catalogues and caches:
// os.UserCacheDir()/skyframe. It does not create it.
func CacheDir() (string, error) {
	d, err := os.UserCacheDir()
	if err != nil {
		return "", fmt.Errorf("catalog: no user cache directory: %w", err)
	}
	return filepath.Join(d, "skyframe"), nil
}

// FetchOptions refines Fetch; the zero value detects the format.
type FetchOptions struct {
	Format Format // expected format, checked after download; FormatAuto accepts any
}

// Fetch downloads url to dst (the cache directory and the URL's base name
// when dst is ""). It writes to a temporary file beside dst, checks the
// structure by reading it completely with the catalogue reader, and only
// then renames it into place, so dst is either the old file or a verified
// new one. progress, if not nil, is called after each chunk with the bytes
// done and the total (−1 when the server does not say). client nil means
// http.DefaultClient.
func Fetch(ctx context.Context, client *http.Client, url string, dst string, progress func(done, total int64)) error {
	return FetchWith(ctx, client, url, dst, progress, FetchOptions{})
}

// FetchWith is Fetch with options.
func FetchWith(ctx context.Context, client *http.Client, url string, dst string, progress func(done, total int64), opt FetchOptions) (err error) {
	if client == nil {
		client = http.DefaultClient
	}
	if dst == "" {
		dir, err := CacheDir()
		if err != nil {
			return err
		}
		base := path.Base(url)
		if base == "" || base == "/" || base == "." {
			return fmt.Errorf("catalog: fetch: cannot name a file after %q", url)
		}
		dst = filepath.Join(dir, base)
	}
	dir := filepath.Dir(dst)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("catalog: fetch: %w", err)
	}
	req, err := http.NewRequestWithContext(ctx, http.MethodGet, url, nil)
	if err != nil {
		return fmt.Errorf("catalog: fetch: %w", err)
	}
	resp, err := client.Do(req)
	if err != nil {
		return fmt.Errorf("catalog: fetch: %w", err)
	}
	defer resp.Body.Close()
	if resp.StatusCode != http.StatusOK {
		return fmt.Errorf("catalog: fetch %s: HTTP status %s", url, resp.Status)
	}
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(dst)+".*.part")
	if err != nil {
		return fmt.Errorf("catalog: fetch: %w", err)
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	total := resp.ContentLength
	var done int64
	buf := make([]byte, 64<<10)
	for {
		n, rerr := resp.Body.Read(buf)
		if n > 0 {
			done += int64(n)
			if done > MaxDownloadBytes {
				return fmt.Errorf("catalog: fetch %s: more than %d bytes", url, MaxDownloadBytes)
			}
			if _, werr := tmp.Write(buf[:n]); werr != nil {
				return fmt.Errorf("catalog: fetch: %w", werr)
			}
			if progress != nil {
				progress(done, total)
			}
		}
		if rerr == io.EOF {
			break
		}
		if rerr != nil {
			return fmt.Errorf("catalog: fetch %s: %w", url, rerr)
		}
	}
	if total >= 0 && done != total {
		return fmt.Errorf("catalog: fetch %s: %w: got %d of %d bytes", url, ErrTruncated, done, total)
	}
	if err := tmp.Sync(); err != nil {
		return fmt.Errorf("catalog: fetch: %w", err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("catalog: fetch: %w", err)
	}
	_, rep, verr := Open(tmp.Name(), ReadOptions{Format: opt.Format})
	if verr != nil {
		return fmt.Errorf("catalog: fetch %s: downloaded file does not read as a catalogue: %w", url, verr)
	}
	if opt.Format != FormatAuto && rep.Format != opt.Format {
		return fmt.Errorf("catalog: fetch %s: got format %v, want %v", url, rep.Format, opt.Format)
	}
	if err := os.Rename(tmp.Name(), dst); err != nil {
		return fmt.Errorf("catalog: fetch: %w", err)
	}
	return nil
}
