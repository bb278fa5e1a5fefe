package catalog

import (
	"bytes"
	"compress/gzip"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// rawServer answers every request with the raw HTTP/1.1 response head and
// body given, then closes the connection: a server that can cut a body
// anywhere, with or without the headers that delimit it.
func rawServer(t *testing.T, head string, body []byte) string {
	t.Helper()
	srv := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		hj, ok := w.(http.Hijacker)
		if !ok {
			t.Error("no hijacker")
			return
		}
		c, bw, err := hj.Hijack()
		if err != nil {
			t.Error(err)
			return
		}
		defer c.Close()
		bw.WriteString(head)
		bw.Write(body)
		bw.Flush()
	}))
	t.Cleanup(srv.Close)
	return srv.URL + "/catalog.gz"
}

// TestFetchRefusesPartialDownloads (item 10): a download whose end cannot
// be established, or that is cut short however it is delimited, is refused
// and leaves neither the destination nor a partial file. Before the fix, a
// close-delimited body (no Content-Length, not chunked: RFC 9112 §6.3) cut
// short, plain or at a gzip member boundary, was saved as good.
func TestFetchRefusesPartialDownloads(t *testing.T) {
	raw, err := os.ReadFile(fixture("bsc5_good.dat"))
	if err != nil {
		t.Fatal(err)
	}
	lines := bytes.SplitAfter(raw, []byte("\n"))
	// Two gzip members (RFC 1952 §2.2 allows several), a line in each.
	var multi bytes.Buffer
	for _, part := range [][]byte{bytes.Join(lines[:1], nil), bytes.Join(lines[1:], nil)} {
		zw := gzip.NewWriter(&multi)
		zw.Write(part)
		zw.Close()
	}
	var first bytes.Buffer
	zw := gzip.NewWriter(&first)
	zw.Write(lines[0])
	zw.Close()
	whole := multi.Bytes()
	atBoundary := whole[:first.Len()]   // a valid gzip file of the first member only
	midMember := whole[:first.Len()+20] // into the second member
	plainCut := raw[:len(raw)-len(lines[len(lines)-2])]

	closeHead := "HTTP/1.1 200 OK\r\nConnection: close\r\n\r\n"
	lenHead := func(n int) string {
		return "HTTP/1.1 200 OK\r\nConnection: close\r\nContent-Length: " + strconv.Itoa(n) + "\r\n\r\n"
	}
	chunkedCut := func(b []byte) []byte { // chunks without the terminating zero chunk
		return []byte(fmt.Sprintf("%x\r\n%s\r\n", len(b), b))
	}
	sum := sha256.Sum256(whole)
	cases := []struct {
		name string
		url  string
		opt  FetchOptions
		want error
	}{
		{"close-delimited whole body, no size", rawServer(t, closeHead, whole), FetchOptions{}, ErrUnverifiable},
		{"close-delimited, cut at a gzip member boundary", rawServer(t, closeHead, atBoundary), FetchOptions{}, ErrUnverifiable},
		{"close-delimited plain text cut at a line end", rawServer(t, closeHead, plainCut), FetchOptions{}, ErrUnverifiable},
		{"close-delimited, cut, expected size given", rawServer(t, closeHead, atBoundary), FetchOptions{Size: int64(len(whole))}, ErrTruncated},
		{"Content-Length, body cut short", rawServer(t, lenHead(len(whole)), atBoundary), FetchOptions{}, ErrTruncated},
		{"chunked, terminating chunk missing", rawServer(t, "HTTP/1.1 200 OK\r\nConnection: close\r\nTransfer-Encoding: chunked\r\n\r\n", chunkedCut(atBoundary)), FetchOptions{}, ErrTruncated},
		{"consistent length, gzip member cut inside", rawServer(t, lenHead(len(midMember)), midMember), FetchOptions{}, ErrTruncated},
		{"wrong size announced", rawServer(t, lenHead(len(atBoundary)), atBoundary), FetchOptions{Size: int64(len(whole))}, nil},
		{"SHA-256 mismatch", rawServer(t, lenHead(len(atBoundary)), atBoundary), FetchOptions{SHA256: hex.EncodeToString(sum[:])}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			dst := filepath.Join(dir, "bsc5.dat.gz")
			err := FetchWith(context.Background(), nil, c.url, dst, nil, c.opt)
			if err == nil {
				t.Fatal("accepted")
			}
			if c.want != nil && !errors.Is(err, c.want) {
				t.Errorf("error %v, want %v", err, c.want)
			}
			if ents, _ := os.ReadDir(dir); len(ents) != 0 {
				t.Errorf("left behind: %v", ents)
			}
		})
	}
	// The whole file passes with any delimitation that marks its end, and
	// with the expected size and digest; Digest reports the SHA-256.
	for _, c := range []struct {
		name, head string
		body       []byte
		opt        FetchOptions
	}{
		{"Content-Length", lenHead(len(whole)), whole, FetchOptions{SHA256: strings.ToUpper(hex.EncodeToString(sum[:]))}},
		{"chunked", "HTTP/1.1 200 OK\r\nConnection: close\r\nTransfer-Encoding: chunked\r\n\r\n", append(chunkedCut(whole), "0\r\n\r\n"...), FetchOptions{}},
		{"close-delimited with the expected size", closeHead, whole, FetchOptions{Size: int64(len(whole))}},
	} {
		t.Run("whole/"+c.name, func(t *testing.T) {
			dir := t.TempDir()
			dst := filepath.Join(dir, "bsc5.dat.gz")
			var digest string
			c.opt.Digest = &digest
			if err := FetchWith(context.Background(), nil, rawServer(t, c.head, c.body), dst, nil, c.opt); err != nil {
				t.Fatal(err)
			}
			if digest != hex.EncodeToString(sum[:]) {
				t.Errorf("digest %s, want %x", digest, sum)
			}
			if s, _, err := Open(dst, ReadOptions{}); err != nil || s.Len() != 3 {
				t.Errorf("fetched file: %v", err)
			}
		})
	}
}
