package main

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// feedFIFO opens the FIFO for writing (blocking until the reader opens it)
// and writes a CSV catalogue into it without end, until the reader goes
// away: an input that never finishes, standing for a very large file.
func feedFIFO(path string) {
	f, err := os.OpenFile(path, os.O_WRONLY, 0)
	if err != nil {
		return
	}
	defer f.Close()
	if _, err := f.WriteString("ra,dec,vmag,bv\n"); err != nil {
		return
	}
	var row bytes.Buffer
	for i := 0; ; i++ {
		row.Reset()
		for k := 0; k < 1000; k++ {
			fmt.Fprintf(&row, "%d.5,%d.25,%d.5,0.6\n", (i+k)%360, (i+k)%170-85, 5+(i+k)%5)
		}
		if _, err := f.Write(row.Bytes()); err != nil {
			return // EPIPE once the reader has exited
		}
	}
}

// TestSignalsStopEveryCommand (item 3): every command, interrupted by
// SIGINT or SIGTERM while it reads its input, stops well under a second,
// exits with status 1 saying it was interrupted, and leaves no file behind.
// The inputs are FIFOs: one fed without end (a catalogue larger than any
// file) and one that no process ever opens for writing (opening it blocks).
// Before the fix only the flight's frame loop watched for signals: still
// and catalog pack carried on to the end, catalog inspect on a FIFO without
// a writer ignored SIGTERM for ever.
func TestSignalsStopEveryCommand(t *testing.T) {
	if testing.Short() {
		t.Skip("starts real processes and waits for them; not in -short")
	}
	cases := []struct {
		name string
		feed bool // feed the FIFO without end; else no writer ever
		args func(dir, fifo string) []string
	}{
		{"still, endless catalogue", true, func(dir, fifo string) []string {
			return []string{"still", "--size", "32x32", "--catalog", fifo, "-o", filepath.Join(dir, "x.png")}
		}},
		{"stars, endless catalogue", true, func(dir, fifo string) []string {
			return []string{"stars", "--catalog", fifo}
		}},
		{"catalog pack, endless catalogue", true, func(dir, fifo string) []string {
			return []string{"catalog", "pack", fifo, "-o", filepath.Join(dir, "x.skyc")}
		}},
		{"catalog inspect, endless catalogue", true, func(dir, fifo string) []string {
			return []string{"catalog", "inspect", fifo}
		}},
		{"catalog inspect, FIFO without writer", false, func(dir, fifo string) []string {
			return []string{"catalog", "inspect", fifo}
		}},
		{"still, FIFO without writer", false, func(dir, fifo string) []string {
			return []string{"still", "--size", "32x32", "--catalog", fifo, "-o", filepath.Join(dir, "x.png")}
		}},
		{"flight, plan FIFO without writer", false, func(dir, fifo string) []string {
			return []string{"flight", fifo, "--out", filepath.Join(dir, "out")}
		}},
		{"flight, endless catalogue", true, func(dir, fifo string) []string {
			plan := writePlan(t, dir, fmt.Sprintf("[catalogue]\npath = %q\n", fifo)+hostileBasePlan)
			return []string{"flight", plan, "--out", filepath.Join(dir, "out")}
		}},
	}
	for _, c := range cases {
		for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
			t.Run(c.name+"/"+sig.String(), func(t *testing.T) {
				dir := t.TempDir()
				fifo := mkfifo(t, dir, "in")
				if c.feed {
					go feedFIFO(fifo)
				}
				args := c.args(dir, fifo)
				keep := map[string]bool{"in": true, "plan.toml": true}
				p := skyframeProc(t, nil, args...)
				var stderr bytes.Buffer
				p.Stderr = &stderr
				if err := p.Start(); err != nil {
					t.Fatal(err)
				}
				time.Sleep(500 * time.Millisecond) // well into reading
				sent := time.Now()
				if err := p.Process.Signal(sig); err != nil {
					t.Fatal(err)
				}
				done := make(chan error, 1)
				go func() { done <- p.Wait() }()
				var err error
				select {
				case err = <-done:
				case <-time.After(10 * time.Second):
					p.Process.Kill()
					<-done
					t.Fatalf("still running 10 s after %v\n%s", sig, stderr.String())
				}
				took := time.Since(sent)
				if took > 700*time.Millisecond {
					t.Errorf("stopped %v after %v, want well under a second", took.Round(time.Millisecond), sig)
				}
				ee, ok := err.(*exec.ExitError)
				if !ok || ee.ExitCode() != exitFailure {
					t.Errorf("exit %v, want status %d\n%s", err, exitFailure, stderr.String())
				}
				if !strings.Contains(stderr.String(), "interrupted") {
					t.Errorf("stderr does not say it was interrupted:\n%s", stderr.String())
				}
				ents, _ := os.ReadDir(dir)
				for _, e := range ents {
					if !keep[e.Name()] {
						t.Errorf("left behind: %s", e.Name())
					}
				}
			})
		}
	}
}
