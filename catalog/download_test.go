package catalog

import (
	"bytes"
	"compress/gzip"
	"context"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// All download tests use loopback httptest servers, never the network.
func TestFetch(t *testing.T) {
	raw, err := os.ReadFile(fixture("bsc5_good.dat"))
	if err != nil {
		t.Fatal(err)
	}
	var zb bytes.Buffer
	zw := gzip.NewWriter(&zb)
	zw.Write(raw)
	zw.Close()
	body := zb.Bytes()
	mux := http.NewServeMux()
	mux.HandleFunc("/ftp/V/50/catalog.gz", func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("Content-Length", strconv.Itoa(len(body)))
		w.Write(body)
	})
	mux.HandleFunc("/junk.gz", func(w http.ResponseWriter, r *http.Request) { w.Write([]byte("<html>not a catalogue</html>\n")) })
	mux.HandleFunc("/short.gz", func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("Content-Length", strconv.Itoa(len(body)))
		w.Write(body[:len(body)/2])
	})
	srv := httptest.NewServer(mux)
	defer srv.Close()

	dir := t.TempDir()
	dst := filepath.Join(dir, "sub", "bsc5.dat.gz")
	var calls int
	var lastDone, lastTotal int64
	err = FetchWith(context.Background(), srv.Client(), srv.URL+"/ftp/V/50/catalog.gz", dst, func(done, total int64) {
		calls++
		lastDone, lastTotal = done, total
	}, FetchOptions{Format: FormatBSC5})
	if err != nil {
		t.Fatal(err)
	}
	if calls == 0 || lastDone != int64(len(body)) || lastTotal != int64(len(body)) {
		t.Errorf("progress: %d calls, last %d/%d, want %d/%d", calls, lastDone, lastTotal, len(body), len(body))
	}
	s, rep, err := Open(dst, ReadOptions{})
	if err != nil || rep.Format != FormatBSC5 || s.Len() != 3 {
		t.Fatalf("fetched file: %v %+v", err, rep)
	}

	// Failures leave dst as it was and no temporary files behind.
	for _, path := range []string{"/junk.gz", "/short.gz", "/missing"} {
		d := filepath.Join(dir, "x"+strings.TrimPrefix(path, "/"))
		if err := Fetch(context.Background(), srv.Client(), srv.URL+path, d, nil); err == nil {
			t.Errorf("%s: fetched without error", path)
		}
		if _, err := os.Stat(d); !os.IsNotExist(err) {
			t.Errorf("%s: destination exists after a failed fetch", path)
		}
	}
	// Wrong format expected.
	if err := FetchWith(context.Background(), srv.Client(), srv.URL+"/ftp/V/50/catalog.gz", filepath.Join(dir, "h.gz"), nil, FetchOptions{Format: FormatHipparcos}); err == nil {
		t.Error("BSC5 accepted as Hipparcos")
	}
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.HasSuffix(e.Name(), ".part") {
			t.Errorf("temporary file left: %s", e.Name())
		}
	}
	// A cancelled context stops the fetch.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if err := Fetch(ctx, srv.Client(), srv.URL+"/ftp/V/50/catalog.gz", filepath.Join(dir, "c.gz"), nil); err == nil {
		t.Error("cancelled fetch succeeded")
	}
}

func TestKnownSources(t *testing.T) {
	for k, s := range KnownSources {
		if s.Name != k || !strings.HasPrefix(s.URL, "https://cdsarc.cds.unistra.fr/ftp/") || s.File == "" || s.Format == FormatAuto {
			t.Errorf("source %q: %+v", k, s)
		}
	}
	for _, k := range []string{"bsc5", "hipparcos"} {
		if _, ok := KnownSources[k]; !ok {
			t.Errorf("missing source %q", k)
		}
	}
	if d, err := CacheDir(); err == nil {
		if filepath.Base(d) != "skyframe" {
			t.Errorf("CacheDir: %q", d)
		}
		if p, err := KnownSources["bsc5"].CachePath(); err != nil || p != filepath.Join(d, "bsc5.dat.gz") {
			t.Errorf("CachePath: %q, %v", p, err)
		}
	}
}
