package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"regexp"
)

// A sealed sidecar is the indented JSON object (json.MarshalIndent with
// two spaces) with one more member, last:
//
//	"sidecar_sha256": "<SHA-256 of the object as it was without it>"
//
// so that any edit of the file — a flipped digit in a stored luminance, a
// changed checksum of an image — is detected by --verify and --resume,
// which trust nothing a sidecar says before its seal checks out.
const sealKey = "sidecar_sha256"

var sealRe = regexp.MustCompile(`,\n  "` + sealKey + `": "([0-9a-f]{64})"\n}\n?$`)

// sealJSON adds the seal member to an indented JSON object.
func sealJSON(obj []byte) []byte {
	sum := sha256.Sum256(obj)
	body := bytes.TrimSuffix(obj, []byte("\n}"))
	out := append([]byte(nil), body...)
	out = append(out, ",\n  \""+sealKey+"\": \""+hex.EncodeToString(sum[:])+"\"\n}"...)
	return out
}

// Errors of checkSeal.
var (
	errNoSeal     = errors.New("no " + sealKey + " seal (written by an older version, or edited)")
	errSealBroken = errors.New("edited after it was written (" + sealKey + " does not match)")
)

// checkSeal verifies a sealed JSON object.
func checkSeal(data []byte) error {
	m := sealRe.FindSubmatchIndex(data)
	if m == nil {
		return errNoSeal
	}
	body := append(append([]byte(nil), data[:m[0]]...), "\n}"...)
	sum := sha256.Sum256(body)
	if hex.EncodeToString(sum[:]) != string(data[m[2]:m[3]]) {
		return errSealBroken
	}
	return nil
}
