package exr

import (
	"encoding/binary"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/internal/extools"
)

func writeTemp(t *testing.T, img *Image, comp Compression) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "test.exr")
	f, err := os.Create(p)
	if err != nil {
		t.Fatal(err)
	}
	e := Encoder{Compression: comp}
	if err := e.Encode(f, img); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	return p
}

// OpenEXR's own exrheader (Debian package openexr) reads our header and
// lists every attribute with the values we wrote.
func TestExrheaderReadsHeader(t *testing.T) {
	exrheader := extools.Command(t, "exrheader", "openexr")
	img := randomImage(rand.New(rand.NewPCG(7, 8)), 37, 21)
	for _, comp := range []Compression{ZIP, None} {
		p := writeTemp(t, img, comp)
		out, err := exec.Command(exrheader, p).CombinedOutput()
		if err != nil {
			t.Fatalf("exrheader: %v\n%s", err, out)
		}
		s := string(out)
		want := []string{
			"compression (type compression): " + map[Compression]string{ZIP: "zip, multi-scanline blocks", None: "none"}[comp],
			"dataWindow (type box2i): (0 0) - (36 20)",
			"displayWindow (type box2i): (0 0) - (36 20)",
			"lineOrder (type lineOrder): increasing y",
			"pixelAspectRatio (type float): 1",
			"screenWindowWidth (type float): 1",
			"B, 16-bit floating-point, sampling 1 1",
			"G, 32-bit floating-point, sampling 1 1",
			"doppler.D, 32-bit floating-point, sampling 1 1",
			"stars.R, 16-bit floating-point, sampling 1 1",
			"chromaticities (type chromaticities):",
			"red   (0.64 0.33)",
			"white (0.3127 0.329)",
			"framesPerSecond (type rational): 30/1",
			"envmap (type envmap): latitude-longitude map",
			"skyframe:beta (type double): 0.9",
			"comments (type string): \"a test\"",
			"\"stars\"",
			"\"cmb\"",
		}
		for _, w := range want {
			if !strings.Contains(s, w) {
				t.Errorf("%v: exrheader output lacks %q:\n%s", comp, w, s)
			}
		}
	}
}

// OpenImageIO (Debian python3-openimageio), an independent reader, returns
// every channel's samples exactly as stored (half-rounded for HALF
// channels), for ZIP and uncompressed files.
func TestOpenImageIOReadsPixels(t *testing.T) {
	py := extools.Python(t, "python3-openimageio", "OpenImageIO", "numpy")
	img := randomImage(rand.New(rand.NewPCG(9, 10)), 45, 35)
	script := `
import sys, OpenImageIO as oiio, numpy as np
inp = oiio.ImageInput.open(sys.argv[1])
if inp is None:
    sys.exit("open: " + oiio.geterror())
spec = inp.spec()
px = inp.read_image(oiio.FLOAT)
inp.close()
sys.stdout.write("\n".join(spec.channelnames) + "\n")
np.ascontiguousarray(px, dtype="<f4").tofile(sys.argv[2])
`
	for _, comp := range []Compression{ZIP, None} {
		p := writeTemp(t, img, comp)
		raw := p + ".f32"
		out, err := exec.Command(py, "-c", script, p, raw).Output()
		if err != nil {
			t.Fatalf("OpenImageIO: %v", err)
		}
		names := strings.Fields(string(out))
		data, err := os.ReadFile(raw)
		if err != nil {
			t.Fatal(err)
		}
		nc := len(names)
		if nc != len(img.Channels) || len(data) != 4*nc*img.Width*img.Height {
			t.Fatalf("%v: OpenImageIO sees channels %v and %d bytes", comp, names, len(data))
		}
		for ci, name := range names {
			var c *Channel
			for k := range img.Channels {
				if img.Channels[k].Name == name {
					c = &img.Channels[k]
				}
			}
			if c == nil {
				t.Fatalf("OpenImageIO reports channel %q we did not write", name)
			}
			for i, v := range c.Pix {
				got := math.Float32frombits(binary.LittleEndian.Uint32(data[4*(i*nc+ci):]))
				if want := stored(*c, v); math.Float32bits(got) != math.Float32bits(want) {
					t.Fatalf("%v: %s pixel %d: OpenImageIO %g, want %g", comp, name, i, got, want)
				}
			}
		}
	}
}
