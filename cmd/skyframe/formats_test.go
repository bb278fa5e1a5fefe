package main

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/internal/extools"
)

// astropy's CCDData.read (Debian python3-astropy) opens a still's FITS
// file, and the header's LUXSCALE reproduces the sidecar's scale_per_lux
// exactly; the white point and the layers are recorded.
func TestStillFITSAstropy(t *testing.T) {
	py := extools.Python(t, "python3-astropy", "astropy", "numpy")
	dir := t.TempDir()
	png, fits := filepath.Join(dir, "a.png"), filepath.Join(dir, "a.fits")
	if _, errs, code := runCmd(t, "still", "--size", "64x48", "--cmb", "--white", "d50", "-o", png, "--fits", fits); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var side struct {
		Scale float64 `json:"scale_per_lux"`
	}
	b, err := os.ReadFile(filepath.Join(dir, "a.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &side); err != nil || !(side.Scale > 0) {
		t.Fatalf("sidecar scale_per_lux %v (%v)", side.Scale, err)
	}
	script := `
import sys, warnings
warnings.simplefilter("ignore")
from astropy.nddata import CCDData
c = CCDData.read(sys.argv[1])
print(repr(str(c.unit)), repr(float(c.header["LUXSCALE"])), c.header["WHITEPT"], c.header["LAYERS"], c.data.shape)
`
	out, err := exec.Command(py, "-c", script, fits).CombinedOutput()
	if err != nil {
		t.Fatalf("astropy: %v\n%s", err, out)
	}
	f := strings.Fields(string(out))
	if len(f) < 4 {
		t.Fatalf("astropy printed %q", out)
	}
	if f[0] != "''" {
		t.Errorf("unit %s, want dimensionless", f[0])
	}
	if v, err := strconv.ParseFloat(f[1], 64); err != nil || v != side.Scale {
		t.Errorf("LUXSCALE %s, sidecar scale_per_lux %v", f[1], side.Scale)
	}
	if f[2] != "d50" || f[3] != "stars,cmb,unresolved" { // the built-in sky draws its unresolved light by default
		t.Errorf("WHITEPT %s, LAYERS %s; want d50, stars,cmb,unresolved", f[2], f[3])
	}
}
