package catalog

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// writeStarsFile writes s with write (WriteCache, WriteParquet) to a new
// file name in a temporary directory and returns its path.
func writeStarsFile(tb testing.TB, name string, write func(io.Writer, *Stars) error, s *Stars) string {
	tb.Helper()
	p := filepath.Join(tb.TempDir(), name)
	f, err := os.Create(p)
	if err != nil {
		tb.Fatal(err)
	}
	if err := write(f, s); err != nil {
		tb.Fatal(err)
	}
	if err := f.Close(); err != nil {
		tb.Fatal(err)
	}
	return p
}

// hipMainText generates n rows in the hip_main.dat layout (fields H0…H77,
// widths as in hip_main_good.dat), invented values from a seeded generator.
func hipMainText(n int) []byte {
	rng := rand.New(rand.NewPCG(11, 12))
	w := []int{1, 12, 1, 11, 11, 5, 1, 1, 12, 12, 1, 7, 8, 8}
	for i := 0; i < 5; i++ {
		w = append(w, 6)
	}
	for i := 0; i < 10; i++ {
		w = append(w, 5)
	}
	w = append(w, 3, 5, 6, 6, 5, 6, 5, 1, 6)
	for len(w) < 78 {
		w = append(w, 5)
	}
	var b bytes.Buffer
	f := make([]string, 78)
	for i := 0; i < n; i++ {
		for k := range f {
			f[k] = ""
		}
		f[0], f[1] = "H", fmt.Sprint(i+1)
		f[5] = fmt.Sprintf("%5.2f", 1+11*rng.Float64())
		f[8] = fmt.Sprintf("%12.8f", 360*rng.Float64())
		f[9] = fmt.Sprintf("%+12.8f", 180*rng.Float64()-90)
		f[11] = fmt.Sprintf("%7.2f", 40*rng.Float64()-2)
		f[12] = fmt.Sprintf("%8.2f", 100*rng.NormFloat64())
		f[13] = fmt.Sprintf("%8.2f", 100*rng.NormFloat64())
		if i%10 != 0 {
			f[37] = fmt.Sprintf("%6.3f", 2*rng.Float64()-0.3)
		}
		for k, v := range f {
			if k > 0 {
				b.WriteByte('|')
			}
			b.WriteString(strings.Repeat(" ", max(0, w[k]-len(v))))
			b.WriteString(v)
		}
		b.WriteByte('\n')
	}
	return b.Bytes()
}

// BenchmarkReadHipparcos118k: a Hipparcos-size text catalogue (target < 0.5 s).
func BenchmarkReadHipparcos118k(b *testing.B) {
	text := hipMainText(118218)
	b.SetBytes(int64(len(text)))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		s, _, err := Read(bytes.NewReader(text), "hip_main.dat", ReadOptions{})
		if err != nil || s.Len() != 118218 {
			b.Fatal(err)
		}
	}
}

func BenchmarkReadBSC5(b *testing.B) {
	raw, err := os.ReadFile(sharedBSC5(b))
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(raw)))
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, _, err := Read(bytes.NewReader(raw), "bsc5.dat", ReadOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// bigStars fills n rows directly (no per-row Append) for cache benchmarks.
func bigStars(n int) *Stars {
	s := &Stars{Epoch: 2016, Source: "bench", Format: "gaia",
		ID: make([]int64, n), X: make([]float32, n), Y: make([]float32, n), Z: make([]float32, n),
		Dist: make([]float32, n), Vmag: make([]float32, n), Teff: make([]float32, n), BV: make([]float32, n),
		Flags: make([]Flag, n), PMRA: make([]float32, n), PMDec: make([]float32, n)}
	for i := 0; i < n; i++ {
		a := float64(i) * 2.399963
		z := 1 - 2*(float64(i)+0.5)/float64(n)
		r := math.Sqrt(1 - z*z)
		s.ID[i] = int64(i)
		s.X[i], s.Y[i], s.Z[i] = float32(r*math.Cos(a)), float32(r*math.Sin(a)), float32(z)
		s.Dist[i] = float32(10 + i%1000)
		s.Vmag[i] = float32(i%2000) / 100
		s.BV[i] = float32(i%200) / 100
		s.Teff[i] = float32(TeffFromBV(float64(s.BV[i])))
		s.PMRA[i], s.PMDec[i] = float32(i%100), -float32(i%50)
	}
	return s
}

// BenchmarkCacheLoad10M: a binary cache of 10⁷ stars (target < 1 s).
func BenchmarkCacheLoad10M(b *testing.B) {
	if testing.Short() {
		b.Skip("10⁷-star cache benchmark skipped with -short")
	}
	benchCacheLoad(b, 10_000_000)
}

func BenchmarkCacheLoad100k(b *testing.B) { benchCacheLoad(b, 100_000) }

func benchCacheLoad(b *testing.B, n int) {
	var buf bytes.Buffer
	if err := WriteCache(&buf, bigStars(n)); err != nil {
		b.Fatal(err)
	}
	data := buf.Bytes()
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		s, err := ReadCache(bytes.NewReader(data))
		if err != nil || s.Len() != n {
			b.Fatal(err)
		}
	}
}

func BenchmarkCacheWrite100k(b *testing.B) {
	s := bigStars(100_000)
	var buf bytes.Buffer
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		buf.Reset()
		if err := WriteCache(&buf, s); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkOpenCache1M: Open on a cache file of 10⁶ stars (the CLI path).
func BenchmarkOpenCache1M(b *testing.B) {
	p := writeStarsFile(b, "c.skyfcat", WriteCache, bigStars(1_000_000))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		s, _, err := Open(p, ReadOptions{})
		if err != nil || s.Len() != 1_000_000 {
			b.Fatal(err)
		}
	}
}
