package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/skyframe/skyframe/analysis"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/imgfile"
	"github.com/skyframe/skyframe/internal/sharedcat"
	"github.com/skyframe/skyframe/render"
)

// runCmd runs the command line in-process and returns stdout, stderr and the
// exit status.
func runCmd(t *testing.T, args ...string) (string, string, int) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, &out, &errb)
	return out.String(), errb.String(), code
}

// TestStarsBSC5AtRest: at β = 0 and at the Sun every star of the real Bright
// Star Catalogue keeps its catalogue V (within 0.01 mag) and its catalogue
// direction, and D = 1. Expected values: the catalogue itself
// (Hoffleit & Warren 1991, CDS V/50). Directions agree to 1e-6° (3.6 mas),
// the float32 storage precision of the star columns; BSC5 itself gives
// positions to 0.1 s and 1″.
func TestStarsBSC5AtRest(t *testing.T) {
	path := sharedcat.BSC5(t)
	out, errs, code := runCmd(t, "stars", "--catalog", path, "--speed", "0", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rows []analysis.StarRow
	if err := json.Unmarshal([]byte(out), &rows); err != nil {
		t.Fatal(err)
	}
	if len(rows) != 9096 {
		t.Fatalf("have %d rows, want the catalogue's 9096", len(rows))
	}
	for _, r := range rows {
		if math.Abs(r.VmagObs-r.Vmag) > 0.01 {
			t.Errorf("HR %d: vmag_obs %.4f, vmag %.4f", r.ID, r.VmagObs, r.Vmag)
		}
		dra := math.Abs(math.Remainder(r.RAObs-r.RA, 360)) * math.Cos(r.Dec*math.Pi/180)
		if dra > 1e-6 || math.Abs(r.DecObs-r.Dec) > 1e-6 {
			t.Errorf("HR %d: apparent (%.9f, %.9f), catalogue (%.9f, %.9f)", r.ID, r.RAObs, r.DecObs, r.RA, r.Dec)
		}
		if r.Doppler != 1 || r.FluxRatio != 1 {
			t.Errorf("HR %d: D = %v, flux ratio %v at rest; want 1, 1", r.ID, r.Doppler, r.FluxRatio)
		}
	}
	if rows[0].ID != 2491 {
		t.Errorf("brightest star is HR %d, want HR 2491 (Sirius, V = -1.46)", rows[0].ID)
	}
}

// tanWorld evaluates the FITS WCS pixel → world transform for a TAN header,
// written here from Calabretta & Greisen (2002, A&A 395, 1077) §2–§5.1.3 and
// Greisen & Calabretta (2002, A&A 395, 1061) eq. (1)–(4), independently of
// the renderer's projection code. p1, p2 are 1-based FITS pixel coordinates.
func tanWorld(t *testing.T, h imgfile.FITSHeader, p1, p2 float64) (ra, dec float64) {
	t.Helper()
	get := func(k string, def float64) float64 {
		v, err := h.Float(k)
		if err != nil {
			return def
		}
		return v
	}
	crpix1, crpix2 := get("CRPIX1", 0), get("CRPIX2", 0)
	cdelt1, cdelt2 := get("CDELT1", 1), get("CDELT2", 1)
	pc11, pc12, pc21, pc22 := get("PC1_1", 1), get("PC1_2", 0), get("PC2_1", 0), get("PC2_2", 1)
	a0, d0 := get("CRVAL1", 0)*math.Pi/180, get("CRVAL2", 0)*math.Pi/180
	phiP := get("LONPOLE", 180) * math.Pi / 180
	// Intermediate world coordinates (degrees), Paper I eq. (1)–(3).
	dx, dy := p1-crpix1, p2-crpix2
	x := cdelt1 * (pc11*dx + pc12*dy)
	y := cdelt2 * (pc21*dx + pc22*dy)
	// TAN: native spherical coordinates, Paper II eq. (14), (15), (54).
	phi := math.Atan2(x, -y)
	rth := math.Hypot(x, y)
	theta := math.Atan2(180/math.Pi, rth)
	// Spherical rotation to celestial, Paper II eq. (2), zenithal reference
	// point: (α_p, δ_p) = (CRVAL1, CRVAL2).
	sd, cd := math.Sin(d0), math.Cos(d0)
	st, ct := math.Sin(theta), math.Cos(theta)
	sp, cp := math.Sin(phi-phiP), math.Cos(phi-phiP)
	da := math.Atan2(-ct*sp, st*cd-ct*sd*cp)
	dec = math.Asin(st*sd + ct*cd*cp)
	ra = math.Mod((a0+da)*180/math.Pi+360, 360)
	return ra, dec * 180 / math.Pi
}

// TestStillFITSWCSMatchesStars renders a moving frame of the real sky with
// FITS output and checks that the FITS WCS maps each listed star's pixel to
// the apparent RA/Dec that `skyframe stars` reports, within 0.5 px.
func TestStillFITSWCSMatchesStars(t *testing.T) {
	path := sharedcat.BSC5(t)
	dir := t.TempDir()
	png, fits := filepath.Join(dir, "f.png"), filepath.Join(dir, "f.fits")
	phys := []string{"--catalog", path, "--speed", "0.6", "--toward", "83.8,-5.4"}
	args := append([]string{"still", "-o", png, "--fits", fits, "--size", "800x600", "--fov", "70",
		"--look", "101.3,-16.7", "--roll", "17"}, phys...)
	if _, errs, code := runCmd(t, args...); code != 0 {
		t.Fatalf("still: exit %d: %s", code, errs)
	}
	var side render.Sidecar
	data, err := os.ReadFile(filepath.Join(dir, "f.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &side); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(fits)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	h, err := imgfile.ReadFITSHeader(f)
	if err != nil {
		t.Fatal(err)
	}
	if s, _ := h.String("CTYPE1"); s != "RA---TAN" {
		t.Fatalf("CTYPE1 = %q, want RA---TAN for a pinhole frame", s)
	}
	out, errs, code := runCmd(t, append([]string{"stars", "--format", "json"}, phys...)...)
	if code != 0 {
		t.Fatalf("stars: exit %d: %s", code, errs)
	}
	var rows []analysis.StarRow
	if err := json.Unmarshal([]byte(out), &rows); err != nil {
		t.Fatal(err)
	}
	obs := map[int64]analysis.StarRow{}
	for _, r := range rows {
		obs[r.ID] = r
	}
	// Smallest angle a pixel subtends in this pinhole frame (at the corners):
	// (1/f)·cos²θ, f = (W/2)/tan(FOV/2), θ the corner's off-axis angle.
	focal := 400 / math.Tan(35*math.Pi/180)
	corner := math.Atan(500 / focal)
	scale := math.Pow(math.Cos(corner), 2) / focal * 180 / math.Pi
	if len(side.Brightest) < 5 {
		t.Fatalf("only %d stars listed in the sidecar", len(side.Brightest))
	}
	for _, s := range side.Brightest {
		r, ok := obs[s.ID]
		if !ok {
			t.Fatalf("HR %d drawn but not listed by stars", s.ID)
		}
		// Buffer pixel (i, j) is FITS pixel (i+1, H−j) (rows stored bottom-up).
		ra, dec := tanWorld(t, h, s.X+0.5, 600-s.Y+0.5)
		sep := angle(ra, dec, r.RAObs, r.DecObs)
		if sep/scale > 0.5 {
			t.Errorf("HR %d at pixel (%.2f, %.2f): WCS gives (%.5f, %.5f), stars gives (%.5f, %.5f): %.3f px",
				s.ID, s.X, s.Y, ra, dec, r.RAObs, r.DecObs, sep/scale)
		}
	}
}

// angle is the great-circle separation of two RA/Dec directions, degrees.
func angle(ra1, d1, ra2, d2 float64) float64 {
	r := math.Pi / 180
	c := math.Sin(d1*r)*math.Sin(d2*r) + math.Cos(d1*r)*math.Cos(d2*r)*math.Cos((ra1-ra2)*r)
	return math.Acos(math.Max(-1, math.Min(1, c))) / r
}

// TestStillDefaultRun: with no options beyond the output, still renders the
// built-in sky and writes the PNG and its sidecar, nothing else.
func TestStillDefaultRun(t *testing.T) {
	dir := t.TempDir()
	png := filepath.Join(dir, "sky.png")
	out, errs, code := runCmd(t, "still", "-o", png, "--size", "320x180")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 2 {
		t.Errorf("wrote %d files, want sky.png and sky.json", len(ents))
	}
	if !bytes.Contains([]byte(out), []byte("stars:")) || !bytes.Contains([]byte(out), []byte("brightest:")) {
		t.Errorf("summary lacks star counts or brightest star:\n%s", out)
	}
	_ = catalog.FlagNoDistance
}
