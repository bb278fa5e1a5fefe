package main

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"maps"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/exr"
	"github.com/skyframe/skyframe/imgfile"
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

// oiioChannels reads every channel of an image file with OpenImageIO
// (Debian python3-openimageio), an independent reader, as float32.
func oiioChannels(t *testing.T, path string) (map[string][]float32, int, int) {
	t.Helper()
	py := extools.Python(t, "python3-openimageio", "OpenImageIO", "numpy")
	raw := path + ".f32"
	script := `
import sys, OpenImageIO as oiio, numpy as np
inp = oiio.ImageInput.open(sys.argv[1])
if inp is None:
    sys.exit("open: " + oiio.geterror())
spec = inp.spec()
px = inp.read_image(oiio.FLOAT)
inp.close()
print(spec.width, spec.height, " ".join(spec.channelnames))
np.ascontiguousarray(px, dtype="<f4").tofile(sys.argv[2])
`
	out, err := exec.Command(py, "-c", script, path, raw).Output()
	if err != nil {
		t.Fatalf("OpenImageIO: %v", err)
	}
	f := strings.Fields(string(out))
	w, _ := strconv.Atoi(f[0])
	h, _ := strconv.Atoi(f[1])
	names := f[2:]
	data, err := os.ReadFile(raw)
	if err != nil {
		t.Fatal(err)
	}
	nc := len(names)
	if len(data) != 4*nc*w*h {
		t.Fatalf("OpenImageIO returned %d bytes for %d×%d×%d", len(data), w, h, nc)
	}
	ch := map[string][]float32{}
	for c, name := range names {
		v := make([]float32, w*h)
		for i := range v {
			v[i] = math.Float32frombits(binary.LittleEndian.Uint32(data[4*(i*nc+c):]))
		}
		ch[name] = v
	}
	return ch, w, h
}

// A still's OpenEXR file, read by OpenImageIO: R, G, B equal the FITS
// data to half-float rounding (IEEE 754 binary16, round to nearest: within
// 2⁻¹¹ relative, or 2⁻²⁵ absolute below the normal range), the stars and
// CMB (and unresolved-light) layers sum to them, the Doppler channel is the buffer's, the overlay
// has alpha where the graticule is drawn; exrheader (Debian openexr) lists
// the required, standard and skyframe attributes.
func TestStillEXR(t *testing.T) {
	exrheader := extools.Command(t, "exrheader", "openexr")
	dir := t.TempDir()
	png, fits, exrPath := filepath.Join(dir, "a.png"), filepath.Join(dir, "a.fits"), filepath.Join(dir, "a.exr")
	if _, errs, code := runCmd(t, "still", "--size", "96x64", "--cmb", "--grid", "radec", "--speed", "0.95",
		"-o", png, "--fits", fits, "--exr", exrPath); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	ff, err := os.Open(fits)
	if err != nil {
		t.Fatal(err)
	}
	defer ff.Close()
	fi, err := imgfile.ReadFITS(ff)
	if err != nil {
		t.Fatal(err)
	}
	ch, w, h := oiioChannels(t, exrPath)
	if w != fi.Width || h != fi.Height {
		t.Fatalf("EXR %d×%d, FITS %d×%d", w, h, fi.Width, fi.Height)
	}
	for _, name := range []string{"R", "G", "B", "stars.R", "stars.G", "stars.B", "cmb.R", "cmb.G", "cmb.B",
		"overlay.R", "overlay.G", "overlay.B", "overlay.A", "doppler.D"} {
		if ch[name] == nil {
			t.Fatalf("no channel %s in %v", name, slices.Collect(maps.Keys(ch)))
		}
	}
	halfClose := func(got, want float32) bool {
		d := math.Abs(float64(got) - float64(want))
		return d <= math.Max(math.Abs(float64(want))/2048, 1.0/(1<<25))
	}
	layers := []string{"stars", "cmb"}
	if ch["unresolved.R"] != nil { // the built-in sky's unresolved light
		layers = append(layers, "unresolved")
	}
	lit, alpha := 0, 0
	for i := range w * h {
		for c, name := range []string{"R", "G", "B"} {
			want := fi.Pix[3*i+c]
			if got := ch[name][i]; !halfClose(got, want) {
				t.Fatalf("pixel %d %s: EXR %g, FITS %g", i, name, got, want)
			}
			// Each layer is rounded to half on its own.
			var s float32
			for _, l := range layers {
				s += ch[l+"."+name][i]
			}
			if math.Abs(float64(s-want)) > float64(len(layers))*math.Max(math.Abs(float64(want))/2048, 1.0/(1<<25)) {
				t.Fatalf("pixel %d %s: %v sum to %g, FITS %g", i, name, layers, s, want)
			}
		}
		if d := ch["doppler.D"][i]; d > 0 {
			lit++
			if d < 0.05 || d > 40 { // 0.95 c: D from √(0.05/1.95) = 0.16 to √(1.95/0.05) = 6.2
				t.Fatalf("pixel %d: D = %g", i, d)
			}
		}
		if ch["overlay.A"][i] > 0 {
			alpha++
			if ch["overlay.R"][i] > ch["overlay.A"][i]+1e-3 {
				t.Fatalf("pixel %d: overlay not premultiplied (R %g > A %g)", i, ch["overlay.R"][i], ch["overlay.A"][i])
			}
		}
	}
	if lit == 0 || alpha == 0 {
		t.Errorf("%d pixels with a Doppler factor, %d with overlay alpha", lit, alpha)
	}
	out, err := exec.Command(exrheader, exrPath).CombinedOutput()
	if err != nil {
		t.Fatalf("exrheader: %v\n%s", err, out)
	}
	for _, want := range []string{
		"compression (type compression): zip", "dataWindow (type box2i): (0 0) - (95 63)", "lineOrder (type lineOrder): increasing y",
		"pixelAspectRatio (type float): 1", "screenWindowCenter (type v2f): (0 0)", "screenWindowWidth (type float): 1",
		"chromaticities (type chromaticities):", "red   (0.64 0.33)", "white (0.3127 0.329)",
		"skyframe:beta (type double): 0.95", "skyframe:scalePerLux (type double):", "skyframe:whitePoint (type string): \"d65\"",
		"skyframe:layers (type stringvector):", "\"cmb\"", "skyframe:beaming (type string): \"exact\"",
	} {
		if !strings.Contains(string(out), want) {
			t.Errorf("exrheader output lacks %q:\n%s", want, out)
		}
	}
}

// Bad EXR options: exit status 2 naming the option, and nothing written.
func TestStillEXRBadInput(t *testing.T) {
	dir := t.TempDir()
	png := filepath.Join(dir, "a.png")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--exr", png}, "--exr"},
		{[]string{"--exr", filepath.Join(dir, "a.json")}, "--sidecar"},
		{[]string{"--exr", filepath.Join(dir, "a.exr"), "--exr-layers", "stars,nebula"}, "--exr-layers"},
		{[]string{"--exr", filepath.Join(dir, "a.exr"), "--exr-layers", "cmb"}, "--exr-layers"},
		{[]string{"--exr", filepath.Join(dir, "a.exr"), "--exr-layers", "overlay"}, "--exr-layers"},
		{[]string{"--exr", filepath.Join(dir, "a.exr"), "--exr-type", "double"}, "--exr-type"},
		{[]string{"--exr", filepath.Join(dir, "a.exr"), "--exr-compression", "piz"}, "--exr-compression"},
	} {
		args := append([]string{"still", "--size", "32x24", "-o", png}, c.args...)
		_, errs, code := runCmd(t, args...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want 2 naming %s", c.args, code, errs, c.want)
		}
		if ents, _ := os.ReadDir(dir); len(ents) != 0 {
			t.Errorf("%v: left %d files", c.args, len(ents))
		}
	}
}

// pngTextChunks returns the keyword → text of every tEXt and iTXt chunk and
// the gAMA value of a PNG, decoded by hand from the chunk layout (W3C PNG
// Specification 2nd ed. §5.3 chunk layout, §11.3.3.2 gAMA, §11.3.4.3 tEXt,
// §11.3.4.5 iTXt).
func pngTextChunks(t *testing.T, b []byte) (map[string]string, map[string]string, uint32) {
	t.Helper()
	text, itxt := map[string]string{}, map[string]string{}
	var gama uint32
	if len(b) < 8 || string(b[:8]) != "\x89PNG\r\n\x1a\n" {
		t.Fatal("not a PNG")
	}
	for p := 8; p+12 <= len(b); {
		n := int(binary.BigEndian.Uint32(b[p:]))
		typ := string(b[p+4 : p+8])
		data := b[p+8 : p+8+n]
		switch typ {
		case "gAMA":
			gama = binary.BigEndian.Uint32(data)
		case "tEXt":
			k, v, _ := strings.Cut(string(data), "\x00")
			text[k] = v
		case "iTXt":
			k, rest, _ := strings.Cut(string(data), "\x00")
			// compression flag, method, language tag NUL, translated keyword NUL
			rest = rest[2:]
			_, rest, _ = strings.Cut(rest, "\x00")
			_, rest, _ = strings.Cut(rest, "\x00")
			itxt[k] = rest
		}
		p += 12 + n
	}
	return text, itxt, gama
}

// PNG text keys: no key with a standard or widely read meaning holds our
// values (the Lorentz factor is skyframe:lorentz_factor, not "gamma"; the
// gAMA chunk says 1/2.2 as the sRGB chunk requires, PNG spec §11.3.3.5);
// white point, layers and scale are recorded; equirectangular frames carry
// the GPano XMP in an iTXt chunk keyed XML:com.adobe.xmp (Adobe XMP
// Specification Part 3); and no output file contains the absolute
// directory of the catalogue it was made from.
func TestStillMetadata(t *testing.T) {
	dir := t.TempDir()
	cat, err := filepath.Abs(filepath.Join("..", "..", "testdata", "catalogs", "bsc5_good.dat"))
	if err != nil {
		t.Fatal(err)
	}
	png, fits, exrPath := filepath.Join(dir, "a.png"), filepath.Join(dir, "a.fits"), filepath.Join(dir, "a.exr")
	if _, errs, code := runCmd(t, "still", "--catalog", cat, "--size", "64x32", "--projection", "equirect", "--gamma", "7",
		"--white", "sun", "--cmb", "-o", png, "--fits", fits, "--exr", exrPath); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, err := os.ReadFile(png)
	if err != nil {
		t.Fatal(err)
	}
	text, itxt, gama := pngTextChunks(t, b)
	if gama != 45455 {
		t.Errorf("gAMA %d, want 45455 (1/2.2, sRGB)", gama)
	}
	standard := []string{"Title", "Author", "Description", "Copyright", "Creation Time", "Software", "Disclaimer", "Warning", "Source", "Comment"}
	for k := range text {
		if !slices.Contains(standard, k) && !strings.HasPrefix(k, "skyframe:") {
			t.Errorf("PNG text key %q is neither standard nor skyframe:", k)
		}
	}
	for k, want := range map[string]string{"skyframe:lorentz_factor": "7", "skyframe:white_point": "sun", "skyframe:layers": "stars,cmb", "skyframe:catalog": "bsc5_good.dat"} {
		if text[k] != want {
			t.Errorf("PNG %s = %q, want %q", k, text[k], want)
		}
	}
	xmp := itxt["XML:com.adobe.xmp"]
	for _, want := range []string{"<GPano:ProjectionType>equirectangular</GPano:ProjectionType>",
		"<GPano:FullPanoWidthPixels>64</GPano:FullPanoWidthPixels>", "<GPano:FullPanoHeightPixels>32</GPano:FullPanoHeightPixels>",
		"<GPano:CroppedAreaImageWidthPixels>64<", "<GPano:CroppedAreaLeftPixels>0<", `xmlns:GPano="http://ns.google.com/photos/1.0/panorama/"`} {
		if !strings.Contains(xmp, want) {
			t.Errorf("XMP lacks %q:\n%s", want, xmp)
		}
	}
	catDir := filepath.Dir(cat)
	for _, p := range []string{png, fits, exrPath, filepath.Join(dir, "a.json")} {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if strings.Contains(string(b), catDir) {
			t.Errorf("%s contains the catalogue's directory %s", filepath.Base(p), catDir)
		}
	}

	// Pillow (Debian python3-pil), a widely used reader, reports the display
	// gamma from gAMA and sees the XMP.
	py := extools.Python(t, "python3-pil", "PIL")
	out, err := exec.Command(py, "-c", `
import sys
from PIL import Image
im = Image.open(sys.argv[1])
print(im.info.get("gamma"), "GPano:ProjectionType" in (im.info.get("XML:com.adobe.xmp") or ""))
`, png).CombinedOutput()
	if err != nil {
		t.Fatalf("Pillow: %v\n%s", err, out)
	}
	if got := strings.TrimSpace(string(out)); got != "0.45455 True" {
		t.Errorf("Pillow reports gamma, XMP = %q; want 0.45455 True", got)
	}
}

// A flight with output.exr and output.fits and 16-bit PNG writes every
// file per frame, each recorded with its SHA-256 in the sidecar, so
// --verify checks the EXR too; the EXR holds the frame rate as
// framesPerSecond and R, G, B equal to the FITS data to half rounding.
func TestFlightEXR(t *testing.T) {
	plan, err := os.ReadFile("../../testdata/plans/voyage.toml")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(plan), "sidecar = true", "sidecar = true\nexr = true", 1)
	text = strings.Replace(text, "fits = false", "fits = true", 1)
	text = strings.Replace(text, "width = 640\nheight = 360", "width = 160\nheight = 90\ndepth = 16\nbeaming = \"d4\"", 1)
	dir := t.TempDir()
	path := filepath.Join(dir, "plan.toml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, stderr, code := runCmd(t, "flight", path, "--frames", "0-1"); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	out := filepath.Join(dir, "out", "frames")
	for _, ext := range []string{".png", ".fits", ".exr", ".json"} {
		if _, err := os.Stat(filepath.Join(out, "00001"+ext)); err != nil {
			t.Fatalf("frame 1 %s: %v", ext, err)
		}
	}
	b, err := os.ReadFile(filepath.Join(out, "00000.exr"))
	if err != nil {
		t.Fatal(err)
	}
	d, err := exr.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if v, ok := d.Attr("framesPerSecond"); !ok || v.(exr.Rational).D == 0 {
		t.Errorf("framesPerSecond %v", v)
	}
	// The flight's FITS header names the layers summed in its data, as a
	// still's does (FITS 4.0 §4.1: 80-character keyword cards).
	raw, err := os.ReadFile(filepath.Join(out, "00000.fits"))
	if err != nil {
		t.Fatal(err)
	}
	if i := bytes.Index(raw[:min(len(raw), 2880*4)], []byte("LAYERS  = ")); i < 0 {
		t.Errorf("flight FITS header lacks LAYERS")
	} else if card := string(raw[i : i+80]); !strings.HasPrefix(card, "LAYERS  = 'stars,unresolved'") {
		t.Errorf("flight FITS %q, want LAYERS = 'stars,unresolved' (the plan has cmb = false)", card)
	}
	// ... and the beaming convention the plan asks for (it said exact).
	if i := bytes.Index(raw[:min(len(raw), 2880*4)], []byte("BEAMING = ")); i < 0 {
		t.Errorf("flight FITS header lacks BEAMING")
	} else if card := string(raw[i : i+80]); !strings.HasPrefix(card, "BEAMING = 'd4") {
		t.Errorf("flight FITS %q, want BEAMING = 'd4' (the plan's camera.beaming)", card)
	}
	if side, err := os.ReadFile(filepath.Join(out, "00000.json")); err != nil || !bytes.Contains(side, []byte(`"beaming": "d4"`)) {
		t.Errorf("flight sidecar lacks \"beaming\": \"d4\" (%v)", err)
	}
	ff, err := os.Open(filepath.Join(out, "00000.fits"))
	if err != nil {
		t.Fatal(err)
	}
	defer ff.Close()
	fi, err := imgfile.ReadFITS(ff)
	if err != nil {
		t.Fatal(err)
	}
	r := d.Channel("R")
	if r == nil || d.Width != fi.Width || d.Height != fi.Height {
		t.Fatalf("EXR %d×%d R %v, FITS %d×%d", d.Width, d.Height, r != nil, fi.Width, fi.Height)
	}
	for i, v := range r.Pix {
		want := fi.Pix[3*i]
		if math.Abs(float64(v-want)) > math.Max(math.Abs(float64(want))/2048, 1.0/(1<<25)) {
			t.Fatalf("pixel %d: EXR R %g, FITS %g", i, v, want)
		}
	}
	side, err := os.ReadFile(filepath.Join(out, "00000.json"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(side), `"kind": "exr"`) {
		t.Error("the sidecar does not record the EXR file")
	}
	if _, stderr, code := runCmd(t, "flight", path, "--frames", "0-1", "--verify"); code != 0 {
		t.Errorf("verify: exit %d: %s", code, stderr)
	}
	if err := os.WriteFile(filepath.Join(out, "00001.exr"), []byte("not an exr"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, _, code := runCmd(t, "flight", path, "--frames", "0-1", "--verify"); code != 1 {
		t.Errorf("verify after damaging the EXR: exit %d, want 1", code)
	}
}
