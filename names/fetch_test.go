package names

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/internal/sharedcat"
)

// Fetch against a loopback httptest server only, serving the shared copy
// of the table; never the network.
func TestFetch(t *testing.T) {
	good, err := os.ReadFile(sharedcat.IAUCSN(t))
	if err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256(good)
	mux := http.NewServeMux()
	serve := func(path string, body []byte, length int) {
		mux.HandleFunc(path, func(w http.ResponseWriter, r *http.Request) {
			w.Header().Set("Content-Length", strconv.Itoa(length))
			w.Write(body)
		})
	}
	serve("/IAU-CSN.txt", good, len(good))
	serve("/short.txt", good[:len(good)/2], len(good))
	// Cut at the first half without a Content-Length mismatch: the table
	// then lacks the later check values (Vega, Rigil Kentaurus).
	serve("/half.txt", good[:len(good)/2], len(good)/2)
	serve("/junk.txt", []byte("<html>moved</html>\n"), 19)
	srv := httptest.NewServer(mux)
	defer srv.Close()

	dir := t.TempDir()
	dst := filepath.Join(dir, "cache", "iau-csn.txt")
	src := Source{URL: srv.URL + "/IAU-CSN.txt", File: "iau-csn.txt", Size: int64(len(good)), SHA256: hex.EncodeToString(sum[:])}
	digest, err := Fetch(context.Background(), srv.Client(), src, "", dst)
	if err != nil {
		t.Fatal(err)
	}
	if digest != src.SHA256 {
		t.Errorf("digest %s, want %s", digest, src.SHA256)
	}
	if tab, err := ReadFile(dst); err != nil || len(tab.Entries) != 335 {
		t.Fatalf("fetched table: %v", err)
	}
	for _, c := range []struct {
		name string
		src  Source
		url  string
	}{
		{"truncated", Source{}, srv.URL + "/short.txt"},
		{"half without length", Source{}, srv.URL + "/half.txt"},
		{"not the table", Source{}, srv.URL + "/junk.txt"},
		{"wrong size", Source{Size: 5}, srv.URL + "/IAU-CSN.txt"},
		{"wrong hash", Source{SHA256: strings.Repeat("0", 64)}, srv.URL + "/IAU-CSN.txt"},
		{"missing", Source{}, srv.URL + "/none"},
	} {
		before, _ := os.ReadFile(dst)
		_, err := Fetch(context.Background(), srv.Client(), c.src, c.url, dst)
		if err == nil {
			t.Errorf("%s: accepted", c.name)
		} else if c.name != "missing" && !errors.Is(err, ErrVerify) {
			t.Errorf("%s: %v, want ErrVerify", c.name, err)
		}
		after, _ := os.ReadFile(dst)
		if string(before) != string(after) {
			t.Errorf("%s: the cached file changed", c.name)
		}
		left, _ := filepath.Glob(filepath.Join(dir, "cache", ".*part"))
		if len(left) > 0 {
			t.Errorf("%s: temporary files left: %v", c.name, left)
		}
	}
}
