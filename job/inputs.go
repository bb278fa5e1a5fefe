package job

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"

	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/names"
)

// Inputs identifies everything a flight's frames are made from, key by
// key: the plan text ("plan", flight.Plan.Hash), the tool and its version
// ("tool": the code that draws, including the built-in sky), the catalogue
// ("catalogue": the SHA-256 and length of the file's bytes, or the
// built-in sky) and the star names table ("names": likewise, or none).
// Command-line options that change pixels (preview scale, every Nth frame)
// are folded into the job's hash separately (Job.Preview). Each sidecar
// records these values and their hash; resume re-renders, and verify
// reports, a frame whose record differs, naming the input that changed.
type Inputs map[string]string

// InputsOf computes the identities for a plan whose catalogue file is
// catPath ("" for the built-in sky), made by tool version version.
func InputsOf(ctx context.Context, plan *flight.Plan, catPath string, index *names.Index, version string) (Inputs, error) {
	in := Inputs{"plan": plan.Hash(), "tool": "skyframe " + version, "catalogue": "built-in sky", "names": "none"}
	if catPath != "" {
		id, err := FileIdentity(ctx, catPath)
		if err != nil {
			return nil, inputf("%s: catalogue.path: %w", plan.Name, err)
		}
		in["catalogue"] = id
	}
	if index != nil && index.Table() != nil {
		id, err := FileIdentity(ctx, index.Table().Source)
		if err != nil {
			return nil, inputf("%s: catalogue.names: %w", plan.Name, err)
		}
		in["names"] = id
	}
	return in, nil
}

// Hash is the SHA-256 of the sorted "key=value" lines.
func (in Inputs) Hash() string {
	keys := make([]string, 0, len(in))
	for k := range in {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	var b strings.Builder
	for _, k := range keys {
		fmt.Fprintf(&b, "%s=%s\n", k, in[k])
	}
	return SHA256([]byte(b.String()))
}

// Changed says which inputs differ between a frame's record and now, for
// verify and resume; "" when none does (or the record has none).
func (in Inputs) Changed(rec map[string]string) string {
	if rec == nil {
		return "recorded by a version that did not identify its inputs"
	}
	keys := make([]string, 0, len(in))
	for k := range in {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	var diffs []string
	for _, k := range keys {
		if rec[k] != in[k] {
			diffs = append(diffs, fmt.Sprintf("%s changed (%s then, %s now)", k, short(rec[k]), short(in[k])))
		}
	}
	return strings.Join(diffs, "; ")
}

func short(s string) string {
	if s == "" {
		return "none recorded"
	}
	if len(s) > 28 {
		return s[:28] + "…"
	}
	return s
}

// FileIdentity is "sha256:<hex> <n> bytes" of a file's content, read
// through (and interrupted by) ctx.
func FileIdentity(ctx context.Context, path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, ctxReader{ctx, f})
	if err != nil {
		return "", err
	}
	return fmt.Sprintf("sha256:%s %d bytes", hex.EncodeToString(h.Sum(nil)), n), nil
}

// ctxReader fails every read once ctx is done.
type ctxReader struct {
	ctx context.Context
	r   io.Reader
}

func (c ctxReader) Read(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, context.Cause(c.ctx)
	}
	return c.r.Read(p)
}
