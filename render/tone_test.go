package render

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/spectrum"
)

func TestToneLinearClips(t *testing.T) {
	for _, c := range []struct{ in, want [3]float64 }{
		{[3]float64{0.5, 2, -1}, [3]float64{0.5, 1, 0}},
		{[3]float64{math.NaN(), math.Inf(1), 0.25}, [3]float64{0, 1, 0.25}},
	} {
		r, g, b := Tone(ToneLinear, c.in[0], c.in[1], c.in[2])
		if have := [3]float64{r, g, b}; have != c.want {
			t.Errorf("Tone(linear, %v): have %v, want %v", c.in, have, c.want)
		}
	}
}

// ToneShoulder is the identity below the knee, continuous with slope 1 at
// it, monotonic in luminance, below 1 everywhere, and keeps hue: the
// differences from grey keep their ratios [cp: hue-preserving compression].
func TestToneShoulder(t *testing.T) {
	in := [3]float64{0.2, 0.3, 0.1}
	r, g, b := Tone(ToneShoulder, in[0], in[1], in[2])
	if have := [3]float64{r, g, b}; have != in {
		t.Errorf("below knee: have %v, want %v", have, in)
	}
	lum := func(r, g, b float64) float64 { return lumR*r + lumG*g + lumB*b }
	const h = 1e-6
	a, _, _ := Tone(ToneShoulder, ShoulderKnee+h, ShoulderKnee+h, ShoulderKnee+h)
	if slope := (a - ShoulderKnee) / h; !scalar.EqualWithinAbs(slope, 1, 1e-4) {
		t.Errorf("slope at knee: have %v, want 1", slope)
	}
	prev := 0.0
	for l := 0.01; l < 1e6; l *= 1.3 {
		v, _, _ := Tone(ToneShoulder, l, l, l)
		if v < prev-1e-12 || v > 1 {
			t.Fatalf("grey %v → %v after %v: not monotonic in [0,1]", l, v, prev)
		}
		prev = v
	}
	rng := rand.New(rand.NewPCG(9, 9))
	for k := 0; k < 200; k++ {
		c := [3]float64{rng.Float64(), rng.Float64(), rng.Float64()}
		s := math.Exp(6 * rng.Float64())
		r, g, b := Tone(ToneShoulder, s*c[0], s*c[1], s*c[2])
		if r > 1 || g > 1 || b > 1 || r < 0 || g < 0 || b < 0 {
			t.Fatalf("out of range: %v %v %v", r, g, b)
		}
		li, lo := lum(c[0], c[1], c[2]), lum(r, g, b)
		// hue: (c − l) directions agree.
		d0 := [3]float64{c[0] - li, c[1] - li, c[2] - li}
		d1 := [3]float64{r - lo, g - lo, b - lo}
		n0 := math.Sqrt(d0[0]*d0[0] + d0[1]*d0[1] + d0[2]*d0[2])
		n1 := math.Sqrt(d1[0]*d1[0] + d1[1]*d1[1] + d1[2]*d1[2])
		if n0 < 1e-3 || n1 < 1e-9 {
			continue
		}
		cos := (d0[0]*d1[0] + d0[1]*d1[1] + d0[2]*d1[2]) / (n0 * n1)
		if cos < 1-1e-9 {
			t.Errorf("hue changed for %v×%v: have (%v,%v,%v), cos %v", c, s, r, g, b, cos)
		}
	}
}

// The 8-bit output is the IEC 61966-2-1 encoding rounded: decoding code
// value c/255 and encoding again gives c back [pub: IEC 61966-2-1].
func TestEncodeRoundTrip8(t *testing.T) {
	b, _ := NewBuffer(256, 1, false)
	for c := 0; c < 256; c++ {
		v := float32(spectrum.DecodeSRGB(float64(c) / 255))
		b.Pix[3*c], b.Pix[3*c+1], b.Pix[3*c+2] = v, v, v
	}
	img := b.ToNRGBA(ToneLinear)
	for c := 0; c < 256; c++ {
		if p := img.Pix[4*c : 4*c+4]; int(p[0]) != c || int(p[1]) != c || int(p[2]) != c || p[3] != 255 {
			t.Errorf("code %d: have %v", c, p)
		}
	}
}

// The interpolated encoding table is within 10⁻⁶ of spectrum.EncodeSRGB.
func TestEncodeTable(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for k := 0; k < 100000; k++ {
		v := rng.Float64()
		if k%2 == 0 {
			v *= 0.01
		}
		if have, want := encode(v), spectrum.EncodeSRGB(v); math.Abs(have-want) > 1e-6 {
			t.Fatalf("encode(%v): have %v, want %v", v, have, want)
		}
	}
}

func TestToNRGBA64(t *testing.T) {
	b, _ := NewBuffer(3, 1, false)
	copy(b.Pix, []float32{0, 0, 0, 0.5, 0.5, 0.5, 7, 1, 0.2})
	img := b.ToNRGBA64(ToneLinear)
	want := uint16(spectrum.EncodeSRGB(0.5)*65535 + 0.5)
	for x, w := range [][3]uint16{{0, 0, 0}, {want, want, want}, {65535, 65535, uint16(spectrum.EncodeSRGB(float64(float32(0.2)))*65535 + 0.5)}} {
		c := img.NRGBA64At(x, 0)
		if have := [3]uint16{c.R, c.G, c.B}; have != w || c.A != 65535 {
			t.Errorf("pixel %d: have %v, want %v", x, have, w)
		}
	}
}

func TestParseTone(t *testing.T) {
	for _, m := range []ToneMode{ToneLinear, ToneShoulder} {
		if have, err := ParseTone(m.String()); err != nil || have != m {
			t.Errorf("ParseTone(%q): have %v, %v", m.String(), have, err)
		}
	}
	if _, err := ParseTone("loud"); err == nil {
		t.Error("ParseTone(loud): no error")
	}
}

// Naked-eye preset [cp: limiting magnitude 6.5]: a white V = 6.5 star
// centred on a pixel encodes to about 8/255 at its peak.
func TestNakedEyePreset(t *testing.T) {
	if have, want := NakedEyeExposure(), 6.5+2.5*math.Log10(8.0/255/12.92); !scalar.EqualWithinAbs(have, want, 1e-9) {
		t.Errorf("NakedEyeExposure: have %v, want %v", have, want)
	}
	f, err := Render(one(axisX, NakedEyeLimit, WhiteTemperature), Options{Projection: proj(t, camera.Pinhole, 33, 33), Exposure: NakedEyeExposure()})
	if err != nil {
		t.Fatal(err)
	}
	img := f.ToNRGBA(ToneShoulder)
	p := img.NRGBAAt(16, 16)
	for _, v := range []uint8{p.R, p.G, p.B} {
		if v < JustVisible-1 || v > JustVisible+1 {
			t.Errorf("peak: have %v, want ≈ %d", p, JustVisible)
		}
	}
}

// BenchmarkToneNRGBA tone maps a 1024² frame: "lit", every pixel lit
// (exponential, mean 0.3); "space", a sky's: 85 % of the pixels below code
// 1 (10⁻⁶…10⁻⁴·⁵) in runs, the rest dim (10⁻³).
func BenchmarkToneNRGBA(b *testing.B) {
	for _, c := range []string{"lit", "space"} {
		b.Run(c, func(b *testing.B) {
			buf, _ := NewBuffer(1024, 1024, false)
			rng := rand.New(rand.NewPCG(2, 2))
			for i := range buf.Pix {
				buf.Pix[i] = float32(rng.ExpFloat64() * 0.3)
				if c == "space" {
					buf.Pix[i] = float32(math.Pow(10, -6+1.5*rng.Float64()))
					if (i/3/64)%7 == 0 {
						buf.Pix[i] = 1e-3
					}
				}
			}
			b.ReportAllocs()
			for b.Loop() {
				_ = buf.ToNRGBA(ToneShoulder)
			}
			b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/float64(buf.W*buf.H), "ns/px")
		})
	}
}
