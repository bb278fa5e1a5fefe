package job

import (
	"bytes"
	"encoding/json"
	"testing"
)

// FuzzFlightSidecar feeds arbitrary bytes to what --verify and --resume do
// with a sidecar: the seal check, then decoding. Neither may panic; an
// input that passes the seal must be exactly what Seal makes of its
// body (so no edit can keep a valid seal), and sealing any indented JSON
// object must pass.
func FuzzFlightSidecar(f *testing.F) {
	good, _ := json.MarshalIndent(Sidecar{Flight: Info{PlanHash: "abc", Frame: 3, MeanLuminance: 0.25}}, "", "  ")
	f.Add(Seal(good))
	f.Add(append(Seal(good), '\n'))
	f.Add(good)
	f.Add([]byte(`{"flight": {"frame": 1}, "sidecar_sha256": "00"}`))
	f.Add([]byte("{\n  \"a\": 1,\n  \"sidecar_sha256\": \"" + string(bytes.Repeat([]byte("0"), 64)) + "\"\n}"))
	f.Fuzz(func(t *testing.T, data []byte) {
		if err := CheckSeal(data); err == nil {
			m := sealRe.FindSubmatchIndex(data)
			body := append(append([]byte(nil), data[:m[0]]...), "\n}"...)
			if again := Seal(body); !bytes.Equal(again, bytes.TrimSuffix(data, []byte("\n"))) {
				t.Fatalf("seal passes but resealing differs:\n%q\n%q", data, again)
			}
		}
		var side Sidecar
		_ = json.Unmarshal(data, &side)
		var v any
		if json.Unmarshal(data, &v) == nil {
			if obj, ok := v.(map[string]any); ok && len(obj) > 0 {
				ind, err := json.MarshalIndent(obj, "", "  ")
				if err != nil {
					return
				}
				if err := CheckSeal(Seal(ind)); err != nil {
					t.Fatalf("sealing %q: %v", ind, err)
				}
			}
		}
	})
}
