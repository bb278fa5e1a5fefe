package render

import (
	"bytes"
	"encoding/json"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/skyframe/skyframe/camera"
)

// The sidecar round-trips through JSON and carries the frame's state:
// β = 0.6 gives γ = 1.25 [cp: physics.md] and rapidity atanh 0.6 = 0.693147
// (= ln 2 [mem]); the heading along +Y is RA 90°, Dec 0.
func TestSidecar(t *testing.T) {
	stars := handmade()
	f, err := Render(stars, Options{Projection: proj(t, camera.Fisheye, 64, 64), Observer: observer(t, axisY, 0.6), Exposure: 1.5})
	if err != nil {
		t.Fatal(err)
	}
	s := f.Sidecar("skyframe", "test", stars, ToneShoulder)
	var buf bytes.Buffer
	if err := WriteSidecar(&buf, s); err != nil {
		t.Fatal(err)
	}
	var back Sidecar
	if err := json.Unmarshal(buf.Bytes(), &back); err != nil {
		t.Fatalf("%v in %s", err, buf.Bytes())
	}
	if !scalar.EqualWithinAbs(back.Gamma, 1.25, 1e-12) || !scalar.EqualWithinAbs(back.Rapidity, 0.693147, 1e-6) || back.Beta != 0.6 {
		t.Errorf("kinematics: have β %v γ %v φ %v", back.Beta, back.Gamma, back.Rapidity)
	}
	if back.Heading == nil || !scalar.EqualWithinAbs(back.Heading.RA, 90, 1e-9) || !scalar.EqualWithinAbs(back.Heading.Dec, 0, 1e-9) {
		t.Errorf("heading: have %+v, want RA 90 Dec 0", back.Heading)
	}
	if back.Projection.Kind != camera.Fisheye.String() || back.Projection.Width != 64 || back.Tone != "shoulder" {
		t.Errorf("projection/tone: have %+v %q", back.Projection, back.Tone)
	}
	if back.White != "d65" && back.White != "D65" || back.Beaming != "exact" {
		t.Errorf("white/beaming: have %q %q", back.White, back.Beaming)
	}
	if back.Catalog.Rows != stars.Len() || back.Catalog.Source != "handmade" {
		t.Errorf("catalogue: have %+v", back.Catalog)
	}
	if back.Counts.Drawn != f.Stats.Drawn || back.Counts.Total != stars.Len() || len(back.Brightest) != len(f.Stats.Brightest) {
		t.Errorf("counts: have %+v, want %+v", back.Counts, f.Stats)
	}
	if back.LimitV == nil || *back.LimitV != 11.5 {
		t.Errorf("limit: have %v, want 11.5 (Exposure + 10)", back.LimitV)
	}
	if len(back.Brightest) == 0 || back.Brightest[0].Name == "" {
		t.Errorf("brightest: have %+v", back.Brightest)
	}
}

func TestSidecarNoLimitAndNaN(t *testing.T) {
	f, err := Render(handmade(), Options{Projection: proj(t, camera.Pinhole, 16, 16), Limit: math.Inf(1)})
	if err != nil {
		t.Fatal(err)
	}
	s := f.Sidecar("skyframe", "test", nil, ToneLinear)
	if s.LimitV != nil || s.Heading != nil {
		t.Errorf("no limit / at rest: have limit %v heading %v", s.LimitV, s.Heading)
	}
	s.ExposureV = math.NaN()
	if err := WriteSidecar(&bytes.Buffer{}, s); err == nil {
		t.Error("NaN in sidecar: no error")
	}
}
