package overlay

import (
	"slices"
	"testing"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/internal/sharedcat"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/render"
)

// Labels on a real-sky frame show proper names: Orion from the Bright Star
// Catalogue at rest, the eight brightest stars labelled through the IAU
// Catalog of Star Names (shared/catalogs), plus one star named by its
// Bayer designation. The expected names are the IAU-CSN table's for those
// HR numbers (Betelgeuse HR 2061, Rigel HR 1713, Bellatrix HR 1790,
// Alnilam HR 1903, Alnitak HR 1948, Mintaka HR 1852, Saiph HR 2004); the
// image is a golden [cp: regression against a reviewed render, -regen].
func TestLabelsBSC5NamesGolden(t *testing.T) {
	stars, _, err := catalog.Open(sharedcat.BSC5(t), catalog.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	tab, err := names.ReadFile(sharedcat.IAUCSN(t))
	if err != nil {
		t.Fatal(err)
	}
	x := names.NewIndex(stars, tab)
	orion := camera.FromRADec(83.0, 0)
	p := looking(t, camera.Pinhole, 320, 240, 34, orion)
	f, err := render.Render(stars, render.Options{Projection: p, Observer: observer(t, orion, 0), FWHM: 1.6, Brightest: 8})
	if err != nil {
		t.Fatal(err)
	}
	opt := LabelOptions{Brightest: 8, Stars: []string{"lam Ori"}, Find: x.Find, Text: x.LabelByID}
	targets, err := labelTargets(f, stars, opt)
	if err != nil {
		t.Fatal(err)
	}
	var texts []string
	for _, tg := range targets {
		texts = append(texts, tg.text)
	}
	for _, want := range []string{"Betelgeuse", "Rigel", "Bellatrix", "Alnilam", "Alnitak", "Mintaka", "Saiph", "Meissa"} {
		if !slices.Contains(texts, want) {
			t.Errorf("labels %q lack %q", texts, want)
		}
	}
	img := f.ToNRGBA(render.ToneShoulder)
	if err := Draw(img, f, stars, Options{Labels: opt}); err != nil {
		t.Fatal(err)
	}
	checkGolden(t, "labels_bsc5_names", img)
}
