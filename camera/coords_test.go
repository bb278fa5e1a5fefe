package camera

import (
	"fmt"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"
)

func TestRADecRoundTrip(t *testing.T) {
	cases := []struct {
		v       r3.Vec
		ra, dec float64 // [cp] definition of spherical coordinates
	}{
		{r3.Vec{X: 1}, 0, 0},
		{r3.Vec{Y: 1}, 90, 0},
		{r3.Vec{X: -1}, 180, 0},
		{r3.Vec{Y: -1}, 270, 0},
		{r3.Vec{Z: 1}, 0, 90},
		{r3.Vec{Z: -2}, 0, -90},
		{r3.Vec{X: 1, Y: -1e-300}, 0, 0},
		{r3.Vec{}, 0, 0},
	}
	for _, c := range cases {
		ra, dec := RADec(c.v)
		if !scalar.EqualWithinAbs(ra, c.ra, 1e-12) || !scalar.EqualWithinAbs(dec, c.dec, 1e-12) {
			t.Errorf("RADec(%v): have (%v, %v), want (%v, %v)", c.v, ra, dec, c.ra, c.dec)
		}
		if ra < 0 || ra >= 360 {
			t.Errorf("RADec(%v): ra %v outside [0, 360)", c.v, ra)
		}
	}
	for ra := 0.5; ra < 360; ra += 37.3 {
		for dec := -89.5; dec <= 90; dec += 23.1 {
			hr, hd := RADec(FromRADec(ra, dec))
			if !scalar.EqualWithinAbs(hr, ra, 1e-10) || !scalar.EqualWithinAbs(hd, dec, 1e-10) {
				t.Errorf("round trip (%v, %v) → (%v, %v)", ra, dec, hr, hd)
			}
		}
	}
}

// TestGalactic checks the ESA SP-1200 §1.5.3 galactic frame [pub].
func TestGalactic(t *testing.T) {
	// The defining pole has b = 90°.
	if _, b := GalacticLB(FromRADec(NGPRA, NGPDec)); !scalar.EqualWithinAbs(b, 90, 1e-9) {
		t.Errorf("NGP: b = %.12f, want 90", b)
	}
	// The NCP has l = 122.93192° (definition).
	if l, b := GalacticLB(r3.Vec{Z: 1}); !scalar.EqualWithinAbs(l, LNCP, 1e-9) || !scalar.EqualWithinAbs(b, NGPDec, 1e-9) {
		t.Errorf("NCP: (l, b) = (%v, %v), want (%v, %v)", l, b, LNCP, NGPDec)
	}
	// Galactic centre (l, b) = (0, 0) at ICRS (266.40499°, −28.93617°)
	// [pub SP-1200 §1.5.3, quoted from memory; matches the brief's 266.405,
	// −28.936 to their rounding].
	ra, dec := RADec(FromGalacticLB(0, 0))
	if !scalar.EqualWithinAbs(ra, 266.40499, 1e-5) || !scalar.EqualWithinAbs(dec, -28.93617, 1e-5) {
		t.Errorf("galactic centre: (%.6f, %.6f), want (266.40499, -28.93617)", ra, dec)
	}
	// The rotation matrix A_G′ of SP-1200 eq. 1.5.11 [pub, quoted from
	// memory to its 10 decimals].
	want := [3][3]float64{
		{-0.0548755604, -0.8734370902, -0.4838350155},
		{+0.4941094279, -0.4448296300, +0.7469822445},
		{-0.8676661490, -0.1980763734, +0.4559837762},
	}
	for i, row := range []r3.Vec{galX, galY, galZ} {
		have := [3]float64{row.X, row.Y, row.Z}
		for j := range have {
			if !scalar.EqualWithinAbs(have[j], want[i][j], 1e-9) {
				t.Errorf("A_G[%d][%d] = %.10f, want %.10f", i, j, have[j], want[i][j])
			}
		}
	}
	// Round trip.
	for l := 3.0; l < 360; l += 41 {
		for b := -80.0; b <= 80; b += 33 {
			hl, hb := GalacticLB(FromGalacticLB(l, b))
			if !scalar.EqualWithinAbs(hl, l, 1e-10) || !scalar.EqualWithinAbs(hb, b, 1e-10) {
				t.Errorf("galactic round trip (%v, %v) → (%v, %v)", l, b, hl, hb)
			}
		}
	}
}

func ExampleFromGalacticLB() {
	// The galactic centre in ICRS.
	ra, dec := RADec(FromGalacticLB(0, 0))
	fmt.Printf("RA %.3f°, Dec %.3f°\n", ra, dec)
	// Output: RA 266.405°, Dec -28.936°
}

func ExampleRADec() {
	ra, dec := RADec(r3.Vec{X: 0, Y: 1, Z: 1})
	fmt.Printf("%.1f %.1f\n", ra, dec)
	// Output: 90.0 45.0
}
