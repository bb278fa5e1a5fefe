package main

import (
	"context"
	"io"
	"os"
	"path/filepath"
	"testing"

	"github.com/skyframe/skyframe/imgfile"
	flightjob "github.com/skyframe/skyframe/job"
	"github.com/skyframe/skyframe/render"
)

// benchPlan is a 1920×1080 pinhole flight through the built-in sky.
const benchPlan = `
[[leg]]
kind = "voyage"
accel_g = 1.0
to_star = "Sollow"
speed_cap = 0.95

[show]
fps = 30
seconds = 2

[camera]
projection = "pinhole"
width = 1920
height = 1080
fov = 70
`

func benchJob(b *testing.B) *flightjob.Job {
	b.Helper()
	dir := b.TempDir()
	p := filepath.Join(dir, "plan.toml")
	if err := os.WriteFile(p, []byte(benchPlan), 0o644); err != nil {
		b.Fatal(err)
	}
	e := &env{ctx: context.Background(), stdout: io.Discard, stderr: io.Discard, getenv: func(string) string { return "" }}
	job, err := loadFlightJob(e, p, &flightFlags{})
	if err != nil {
		b.Fatal(err)
	}
	return job
}

// BenchmarkFlightFrame1080p renders and writes (PNG + sidecar, atomically)
// successive frames of a 1920×1080 pinhole flight of the built-in sky.
func BenchmarkFlightFrame1080p(b *testing.B) {
	job := benchJob(b)
	prep, err := render.Prepare(job.Stars)
	if err != nil {
		b.Fatal(err)
	}
	enc := &imgfile.PNGEncoder{}
	n := job.Plan.Frames()
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := job.RenderFrame(prep, enc, i%n); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "frames/s")
}
