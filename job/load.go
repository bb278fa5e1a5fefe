package job

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"time"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/scene"
	"github.com/skyframe/skyframe/sky"
)

// LoadOptions are the settings of a flight run that are not in its plan
// (the command's flags and environment).
type LoadOptions struct {
	Frames  string  // --frames: A-B, A- or A; "" all
	Shard   string  // --shard: K/N or auto; "" the environment's, else the whole job
	Resume  bool    // --resume
	Verify  bool    // --verify
	Out     string  // --out: replaces the plan's output.dir
	Workers int     // --workers
	Preview float64 // --preview scale (1: full size)
	Every   int     // --every N (1: every frame)
	// Version is the tool version recorded in the files and the inputs.
	Version string
	// Getenv reads the scheduler's variables for the shard (nil: none set).
	Getenv func(string) string
	// FreeSpace: see Job.FreeSpace.
	FreeSpace func(dir string) (uint64, error)
	// Maps keeps the unresolved-light maps (Job.Unresolved).
	Maps *sky.UnresolvedMaps
	// Warn receives the report of rows the plan's catalogue skips (nil:
	// discarded).
	Warn io.Writer
}

// Load reads, binds and validates the plan at planPath, before any
// rendering: catalogue and names (paths relative to the plan's
// directory), star references, output directory, frame range and shard,
// camera, layers and outputs. It returns the job and notes for the log
// (how the shard was chosen). Problems with the plan or the settings are
// *InputError (or the plan's own errors) naming the plan file, key or
// flag.
func Load(ctx context.Context, planPath string, f LoadOptions) (*Job, []string, error) {
	var notes []string
	data, err := readPlanFile(ctx, planPath)
	if err != nil {
		return nil, notes, err
	}
	plan, err := flight.ParsePlan(data, planPath)
	if err != nil {
		return nil, notes, err
	}
	base := filepath.Dir(planPath)
	loaded, err := planStars(ctx, f.Warn, plan, base)
	if err != nil {
		return nil, notes, err
	}
	// Every frame's catalogue starts with the loaded one and the Sun; the
	// built-in sky is drawn deeper per frame.
	src := sky.NewSource(loaded, cataloguePath(plan, base) == "")
	stars := src.Base()
	index, err := planNames(plan, base, stars)
	if err != nil {
		return nil, notes, err
	}
	find := func(q string) (int, bool) {
		i, err := index.Find(q)
		return i, err == nil
	}
	plan.StandOff = flight.StarsStandOff(stars, find)
	if err := plan.Bind(flight.StarsResolver(stars, find)); err != nil {
		return nil, notes, err
	}
	inputs, err := InputsOf(ctx, plan, cataloguePath(plan, base), index, f.Version)
	if err != nil {
		return nil, notes, err
	}
	job := &Job{Plan: plan, Hash: inputs.Hash(), Inputs: inputs, Stars: stars, Index: index, Sky: src, Workers: f.Workers,
		Version: f.Version, FreeSpace: f.FreeSpace, Unresolved: f.Maps}
	job.OutDir = plan.Output.Dir
	if !filepath.IsAbs(job.OutDir) {
		job.OutDir = filepath.Join(base, job.OutDir)
	}
	preview := f.Preview != 1 || f.Every != 1
	job.Every = f.Every
	if preview && f.Out == "" {
		job.OutDir = filepath.Clean(job.OutDir) + "-preview"
	}
	if f.Out != "" {
		job.OutDir = f.Out
	}
	if fi, err := os.Stat(job.OutDir); err == nil && !fi.IsDir() {
		if f.Out != "" {
			return nil, notes, inputf("--out %s: exists and is not a directory", f.Out)
		}
		return nil, notes, inputf("%s: output.dir %s: exists and is not a directory", planPath, job.OutDir)
	}
	rng, err := flight.ParseRange(f.Frames)
	if err != nil {
		return nil, notes, inputf("--frames: %v", err)
	}
	total := plan.Frames()
	if lo, hi := rng.Clip(total); lo >= hi && f.Frames != "" {
		return nil, notes, inputf("--frames %s: the plan has frames 0-%d", f.Frames, total-1)
	}
	getenv := f.Getenv
	if getenv == nil {
		getenv = func(string) string { return "" }
	}
	job.Shard = flight.Shard{K: 0, N: 1}
	if f.Shard != "" || !f.Verify {
		sh, why, err := flight.SelectShard(f.Shard, getenv)
		if err != nil {
			if f.Shard != "" {
				return nil, notes, inputf("--shard %s: %v", f.Shard, err)
			}
			return nil, notes, inputf("shard from the environment: %v", err)
		}
		job.Shard = sh
		if why != "" {
			notes = append(notes, fmt.Sprintf("shard %d/%d: %s", sh.K, sh.N, why))
		}
	}
	job.Frames = job.Shard.Frames(total, rng)
	if err := job.CheckOutputNames(planPath); err != nil {
		return nil, notes, err
	}
	if f.Every > 1 {
		job.Frames = slices.DeleteFunc(job.Frames, func(i int) bool { return i%f.Every != 0 })
	}
	if err := job.CheckCamera(); err != nil {
		return nil, notes, err
	}
	if preview {
		job.Preview(f.Preview, f.Every)
	}
	if job.Layers, err = scene.PlanLayers(plan, index, f.Maps); err != nil {
		return nil, notes, err
	}
	job.UnresolvedFollows = src.BuiltIn() && job.Layers.Unresolved != nil && plan.Frame.UnresolvedDepth == nil
	if job.Layers.Unresolved != nil {
		// Frames of a view held on the ship at constant velocity and
		// exposure share their unresolved layer: drawn once, replayed
		// bit for bit (render.DiffuseMemo).
		job.Layers.DiffuseOptions.Memo = new(render.DiffuseMemo)
	}
	job.Layers.ForEightBit(job.eightBitOnly())
	job.Credit = scene.NamesCredit(index, scene.LabelsShown(job.Layers.Labels))
	if fs0, err := plan.FrameState(0); err == nil {
		if p0, err := job.Projection(fs0); err == nil {
			if err := scene.CheckHUDFit(job.Layers, p0, frame.WideHUDValues(plan.Title), planPath+": overlays.hud"); err != nil {
				return nil, notes, err
			}
		}
	}
	if plan.Output.OverlayLayer && !job.Layers.Options.Any() {
		return nil, notes, inputf("%s: output.overlay_layer: no overlay is selected (add overlays.grid, labels, hud, …)", planPath)
	}
	if !*plan.Output.PNG && !plan.Output.FITS {
		return nil, notes, inputf("%s: output: png = false and fits = false: nothing to write", planPath)
	}
	if (f.Resume || f.Verify) && !*plan.Output.Sidecar {
		return nil, notes, inputf("%s: --resume and --verify need output.sidecar = true (the sidecar records each frame's checksums)", planPath)
	}
	return job, notes, nil
}

// readPlanFile reads a plan file through the size limit of plans.
func readPlanFile(ctx context.Context, path string) ([]byte, error) {
	data, err := readSmallFile(ctx, path, flight.MaxPlanBytes)
	if err != nil {
		return nil, inputf("flight: %w", err)
	}
	return data, nil
}

// cataloguePath is the plan's catalogue file (relative paths are taken
// from the plan's directory), or "" for the built-in sky.
func cataloguePath(plan *flight.Plan, base string) string {
	p := plan.Catalogue.Path
	if p == "" || p == "builtin" {
		return ""
	}
	if !filepath.IsAbs(p) {
		p = filepath.Join(base, p)
	}
	return p
}

// planNames reads the plan's catalogue.names (relative to the plan's
// directory; see loadNames) and indexes stars with it.
func planNames(plan *flight.Plan, base string, stars *catalog.Stars) (*names.Index, error) {
	path := plan.Catalogue.Names
	if path != "" && path != "none" && !filepath.IsAbs(path) {
		path = filepath.Join(base, path)
	}
	table, err := scene.LoadNames(path)
	if err != nil {
		return nil, inputf("%s: catalogue.names: %v", plan.Name, err)
	}
	return names.NewIndex(stars, table), nil
}

// planStars opens the plan's catalogue (relative to the plan's directory)
// or returns the built-in sky.
func planStars(ctx context.Context, warn io.Writer, plan *flight.Plan, base string) (*catalog.Stars, error) {
	c := plan.Catalogue
	if c.Path == "" || c.Path == "builtin" {
		if c.Format != "" || len(c.Columns) > 0 {
			return nil, inputf("%s: catalogue.format and catalogue.columns need a catalogue.path", plan.Name)
		}
		return catalog.BuiltIn(), nil
	}
	var opt catalog.ReadOptions
	if c.Format != "" {
		fm, err := catalog.ParseFormat(c.Format)
		if err != nil {
			return nil, inputf("%s: catalogue.format: %v", plan.Name, err)
		}
		opt.Format = fm
	}
	opt.Columns = c.ColumnMap
	path := cataloguePath(plan, base)
	stars, rep, err := scene.OpenCatalog(ctx, []string{path}, opt, nil)
	if err != nil {
		return nil, err
	}
	if warn != nil {
		scene.WriteSkipped(warn, rep)
	}
	return stars, nil
}

// errTooLarge reports a small input (a plan, a sidecar) beyond its limit.
var errTooLarge = errors.New("larger than the limit")

// readSmallFile reads a file that must be small (a plan, a sidecar)
// through a reader limited to limit bytes, so a device such as /dev/zero or
// an endless pipe is refused at the limit instead of filling memory (the
// size from stat is 0 for those); a directory is refused, and the read
// stops when ctx is done, including an open of a FIFO without a writer.
func readSmallFile(ctx context.Context, path string, limit int64) ([]byte, error) {
	if fi, err := os.Stat(path); err == nil && fi.IsDir() {
		return nil, fmt.Errorf("%s is a directory", path)
	}
	type result struct {
		data []byte
		err  error
	}
	ch := make(chan result, 1)
	var f *os.File
	opened := make(chan *os.File, 1)
	go func() {
		g, err := os.Open(path)
		if err != nil {
			ch <- result{nil, err}
			return
		}
		opened <- g
		data, err := io.ReadAll(io.LimitReader(g, limit+1))
		g.Close()
		ch <- result{data, err}
	}()
	select {
	case r := <-ch:
		if r.err != nil {
			return nil, r.err
		}
		if int64(len(r.data)) > limit {
			return nil, fmt.Errorf("%s: %w (at most %d bytes)", path, errTooLarge, limit)
		}
		return r.data, nil
	case <-ctx.Done():
		select {
		case f = <-opened:
			_ = f.SetReadDeadline(time.Unix(1, 0)) // wakes a read blocked on a pipe
		default:
		}
		return nil, fmt.Errorf("reading %s: %w", path, context.Cause(ctx))
	}
}
