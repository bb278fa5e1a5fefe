package render

import (
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/spectrum"
)

// The per-drawing table of the components' photometry against ln D
// matches spectrum.LookupBatch at D·T_k (the tables the stars use) within
// 4·10⁻⁶ relative in Y, and in X and Z relative to the largest of
// X, Y, Z (as the layer's grid measures its errors), at random ln D over the
// whole range of several speeds, for components from 300 K to 60 000 K
// seen at D·T_k ≥ 250 K (ln Y is most curved in the Wien limit, where the
// interpolation errs by h²·c₂/(8λT), 3·10⁻⁶ at 250 K; colder, a blackbody
// has less than e⁻¹⁰⁰ of the luminance of the layer's 2000 K ones); outside
// the range it reports so.
func TestLnDTable(t *testing.T) {
	temps := []float64{300, 1000, 2530, 5600, 12000, 33000, 60000}
	lnT := make([]float64, len(temps))
	for k, T := range temps {
		lnT[k] = math.Log(T)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	w := []float64{1, 1, 1, 1, 1, 1, 1}
	worst := [3]float64{}
	for _, phi := range []float64{0, 0.55, 2.1, 7.9} {
		tab := newLnDTable(lnT, phi)
		if tab == nil {
			t.Fatalf("φ = %g: no table", phi)
		}
		lt, ly, x, y := make([]float64, 1), make([]float64, 1), make([]float64, 1), make([]float64, 1)
		for range 20000 {
			u := (2*rng.Float64() - 1) * phi
			m, f, ok := tab.at(u)
			if !ok {
				t.Fatalf("φ = %g: ln D = %g outside the table", phi, u)
			}
			for k := range temps {
				if temps[k]*math.Exp(u) < 250 {
					continue
				}
				one := make([]float64, len(temps))
				one[k] = w[k]
				X, Y, Z, err := tab.radiance(m, f, one, temps, r3.Vec{})
				if err != nil {
					t.Fatal(err)
				}
				lt[0] = lnT[k] + u
				spectrum.LookupBatch(lt, ly, nil, x, y)
				wy := math.Exp(ly[0])
				wx, wz := x[0]/y[0]*wy, (1-x[0]-y[0])/y[0]*wy
				big := max(wx, wy, wz)
				e := [3]float64{math.Abs(Y/wy - 1), math.Abs(X-wx) / big, math.Abs(Z-wz) / big}
				for c := range e {
					worst[c] = max(worst[c], e[c])
				}
			}
		}
		if _, _, ok := tab.at(phi + 4*lnDTableStep); ok {
			t.Errorf("φ = %g: ln D = φ + 4h inside the table", phi)
		}
	}
	t.Logf("worst relative error: Y %.2e, X %.2e, Z %.2e", worst[0], worst[1], worst[2])
	if !(worst[0] <= 4e-6 && worst[1] <= 4e-6 && worst[2] <= 4e-6) {
		t.Errorf("worst relative error Y %.2e, X %.2e, Z %.2e: want ≤ 4e-6 each", worst[0], worst[1], worst[2])
	}
	if newLnDTable(lnT, 9) != nil {
		t.Error("φ = 9: want no table (over lnDTableMaxNodes)")
	}
}

// lnDTableFor returns the table newLnDTable builds, the same one again for
// the same components and rapidity (the last two kept), and a new one for
// another rapidity or other components.
func TestLnDTableFor(t *testing.T) {
	lnT := []float64{math.Log(3000), math.Log(9000)}
	a := lnDTableFor(lnT, 0.55)
	if !reflect.DeepEqual(a, newLnDTable(lnT, 0.55)) {
		t.Fatal("lnDTableFor's table differs from newLnDTable's")
	}
	b := lnDTableFor(lnT, 0.56)
	if b == a || !reflect.DeepEqual(b, newLnDTable(lnT, 0.56)) {
		t.Fatal("another rapidity: not its own table")
	}
	if lnDTableFor(lnT, 0.55) != a || lnDTableFor(lnT, 0.56) != b {
		t.Error("the last two tables are not kept")
	}
	other := []float64{math.Log(3000), math.Log(9001)}
	if c := lnDTableFor(other, 0.55); c == a || !reflect.DeepEqual(c, newLnDTable(other, 0.55)) {
		t.Error("other components: not their own table")
	}
	lnDTableFor(lnT, 0.1)
	if lnDTableFor(lnT, 0.55) == a {
		t.Error("a table three rapidities back is still kept")
	}
	if lnDTableFor(lnT, 9) != nil {
		t.Error("φ = 9: want no table")
	}
}
