package imgfile

import (
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/internal/extools"
)

// astropy (Debian python3-astropy), an independent FITS reader: its
// CCDData.read accepts our BUNIT (dimensionless), reads the data as we
// wrote them (bottom row first), the WCS keywords and LUXSCALE.
func TestAstropyReadsFITS(t *testing.T) {
	py := extools.Python(t, "python3-astropy", "astropy", "numpy")
	const w, h = 6, 4
	pix := make([]float32, 3*w*h)
	for i := range pix {
		pix[i] = float32(i) * 0.25
	}
	meta, err := FITSMeta{Creator: "skyframe test", Exposure: 2, ScalePerLux: 3.25e6, White: "d65", Layers: []string{"stars", "cmb"}}.Cards()
	if err != nil {
		t.Fatal(err)
	}
	p := camera.Projection{Kind: camera.Pinhole, Width: w, Height: h, FOV: 30, Orient: camera.DefaultOrientation()}
	wcs, err := WCSCards(p)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "t.fits")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := WriteFITS(f, w, h, pix, append(meta, wcs...)); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	script := `
import sys, warnings
warnings.simplefilter("ignore")
from astropy.nddata import CCDData
c = CCDData.read(sys.argv[1])
print(repr(str(c.unit)))
print(c.data.shape)
print(repr(float(c.header["LUXSCALE"])), c.header["WHITEPT"], c.header["LAYERS"])
# plane 1 (G), FITS row 0 = bottom image row, column 2
print(repr(float(c.data[1, 0, 2])))
print(c.wcs.celestial.wcs.ctype[0], c.wcs.celestial.wcs.ctype[1])
`
	out, err := exec.Command(py, "-c", script, path).CombinedOutput()
	if err != nil {
		t.Fatalf("astropy: %v\n%s", err, out)
	}
	lines := strings.Split(strings.TrimSpace(string(out)), "\n")
	if len(lines) != 5 {
		t.Fatalf("astropy printed %q", out)
	}
	if lines[0] != "''" {
		t.Errorf("unit %s, want dimensionless ''", lines[0])
	}
	if lines[1] != "(3, 4, 6)" {
		t.Errorf("shape %s", lines[1])
	}
	f3 := strings.Fields(lines[2])
	if v, err := strconv.ParseFloat(f3[0], 64); err != nil || v != 3.25e6 || f3[1] != "d65" || f3[2] != "stars,cmb" {
		t.Errorf("LUXSCALE/WHITEPT/LAYERS: %s", lines[2])
	}
	// Buffer pixel (x=2, y=h−1), interleaved RGB, is in the bottom FITS row.
	want := float64(pix[3*((h-1)*w+2)+1]) // interleaved R, G, B
	if v, err := strconv.ParseFloat(lines[3], 64); err != nil || math.Abs(v-want) > 0 {
		t.Errorf("G at FITS (3,1): %s, want %g", lines[3], want)
	}
	if lines[4] != "RA---TAN DEC--TAN" {
		t.Errorf("ctype %s", lines[4])
	}
}
