package catalog

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
)

// ErrNoMatch: a glob pattern or a directory given as catalogue input names
// no file.
var ErrNoMatch = errors.New("no file matches")

// ErrMixedFormats: the files of one multi-file input are not all of the
// same format.
var ErrMixedFormats = errors.New("files of different formats")

// ExpandInputs turns catalogue arguments into the list of files to read, in
// order: a directory stands for the regular files directly in it (names
// starting with "." left out), sorted by name; an argument that names no
// existing file and holds a glob metacharacter (* ? [) is a pattern
// (path/filepath.Match syntax), its matches sorted by name, a matched
// directory standing for its files; anything else is a file. A file named
// twice is read once (at its first place). A pattern matching nothing, a
// malformed pattern and a directory without files are errors wrapping
// ErrNoMatch naming the argument; a missing file is left for the reader to
// report.
func ExpandInputs(args []string) ([]string, error) {
	var out []string
	seen := map[string]bool{}
	add := func(p string) {
		if k := filepath.Clean(p); !seen[k] {
			seen[k] = true
			out = append(out, p)
		}
	}
	dir := func(d string) error {
		ents, err := os.ReadDir(d)
		if err != nil {
			return fmt.Errorf("catalog: %w", err)
		}
		n := 0
		for _, e := range ents { // ReadDir sorts by name
			if strings.HasPrefix(e.Name(), ".") {
				continue
			}
			p := filepath.Join(d, e.Name())
			if fi, err := os.Stat(p); err != nil || !fi.Mode().IsRegular() {
				continue
			}
			add(p)
			n++
		}
		if n == 0 {
			return fmt.Errorf("catalog: directory %s: %w (it holds no regular file)", d, ErrNoMatch)
		}
		return nil
	}
	if len(args) == 0 {
		return nil, fmt.Errorf("catalog: %w: no input given", ErrNoMatch)
	}
	for _, a := range args {
		fi, err := os.Stat(a)
		switch {
		case err == nil && fi.IsDir():
			if err := dir(a); err != nil {
				return nil, err
			}
		case err != nil && strings.ContainsAny(a, "*?["):
			m, gerr := filepath.Glob(a)
			if gerr != nil {
				return nil, fmt.Errorf("catalog: pattern %q: %w: %v", a, ErrNoMatch, gerr)
			}
			if len(m) == 0 {
				return nil, fmt.Errorf("catalog: pattern %q: %w", a, ErrNoMatch)
			}
			sort.Strings(m)
			for _, p := range m {
				if fi, err := os.Stat(p); err == nil && fi.IsDir() {
					if err := dir(p); err != nil {
						return nil, err
					}
					continue
				}
				add(p)
			}
		default:
			add(a)
		}
	}
	return out, nil
}

// FilesOptions controls OpenFiles beyond the per-file ReadOptions. The zero
// value reads on GOMAXPROCS goroutines without progress reports.
type FilesOptions struct {
	// Workers is the number of files read at once; 0 means GOMAXPROCS.
	Workers int
	// Progress, when set, is called (never concurrently) as input bytes
	// are read: done and total count the bytes of the files as stored
	// (compressed where they are), files the files finished.
	Progress func(done, total int64, files, totalFiles int)
}

// OpenFiles reads several catalogue files as one catalogue: the stars of
// each file, in the order of paths (whatever the number of workers), each
// file read as Open reads it, on up to FilesOptions.Workers goroutines.
// With ReadOptions.MaxV set, stars fainter than it are dropped while each
// file is read, so only the kept ones are ever held together.
//
// All files must be of one format (the one most of them have) and,
// unless ReadOptions.Epoch propagates them, of one epoch; a file of another
// format is refused with a *ParseError naming it (ErrMixedFormats). The
// first error in path order of a file that fails is returned (a bad row is
// named by file and line, see Read); the others are stopped.
//
// The Report sums the files' lines, rows and skips (Skip.File names the
// file of a reason's first occurrence) and keeps each file's own Report in
// Files; Source is the first path with a count of the others.
func OpenFiles(ctx context.Context, paths []string, opt ReadOptions, fo FilesOptions) (*Stars, *Report, error) {
	if len(paths) == 0 {
		return nil, nil, fmt.Errorf("catalog: %w: no input file", ErrNoMatch)
	}
	workers := fo.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(paths))
	var total int64
	for _, p := range paths {
		if fi, err := os.Stat(p); err == nil && fi.Mode().IsRegular() {
			total += fi.Size()
		}
	}
	opt.allowEmpty = true // the catalogue, not each file, must hold stars
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	type result struct {
		s   *Stars
		rep *Report
		err error
	}
	res := make([]result, len(paths))
	var (
		mu         sync.Mutex
		done       int64
		filesDone  int
		lastReport int64 = -1
	)
	report := func(k int64, fileDone bool) {
		if fo.Progress == nil {
			return
		}
		mu.Lock()
		defer mu.Unlock()
		done += k
		if fileDone {
			filesDone++
		}
		if fileDone || done-lastReport >= 1<<20 {
			lastReport = done
			fo.Progress(done, total, filesDone, len(paths))
		}
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := int(next.Add(1) - 1)
				if i >= len(paths) || ctx.Err() != nil {
					return
				}
				s, rep, err := openCounted(ctx, paths[i], opt, func(k int64) { report(k, false) })
				if err == nil {
					cutFainter(s, rep, opt.MaxV)
				}
				res[i] = result{s, rep, err}
				report(0, true)
				if err != nil {
					cancel()
				}
			}
		}()
	}
	wg.Wait()
	// The first real failure in path order; files stopped because of it
	// fail with the cancellation, which is not theirs to report.
	var cancelled error
	for i := range res {
		switch err := res[i].err; {
		case err == nil:
		case errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded):
			if cancelled == nil {
				cancelled = err
			}
		default:
			return nil, res[i].rep, err
		}
	}
	if cancelled != nil {
		return nil, nil, cancelled
	}
	for i := range res {
		if res[i].s == nil {
			return nil, nil, fmt.Errorf("catalog: reading %s: %w", paths[i], context.Cause(ctx))
		}
	}
	// The format most files have (the earliest on a tie) is the one the
	// others must match, so the odd file out is the one named.
	count := map[Format]int{}
	format := res[0].rep.Format
	for i := range res {
		f := res[i].rep.Format
		count[f]++
		if count[f] > count[format] {
			format = f
		}
	}
	return mergeFiles(paths, format, func(i int) (*Stars, *Report) { return res[i].s, res[i].rep })
}

// openCounted is OpenContext with every byte read from the file counted.
func openCounted(ctx context.Context, path string, opt ReadOptions, count func(int64)) (*Stars, *Report, error) {
	f, err := openInterruptible(ctx, path)
	if err != nil {
		return nil, nil, err
	}
	defer f.Close()
	s, rep, err := open(f, &ctxReader{ctx: ctx, r: &countReader{r: f, count: count}}, path, opt)
	if ctx.Err() != nil {
		return nil, rep, fmt.Errorf("catalog: reading %s: %w", path, context.Cause(ctx))
	}
	return s, rep, err
}

// countReader reports the bytes read through it.
type countReader struct {
	r     io.Reader
	count func(int64)
}

func (c *countReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	if n > 0 {
		c.count(int64(n))
	}
	return n, err
}

// cutFainter drops the stars of s fainter than maxV (0: none), counting
// them as skipped, for readers that did not apply the cut row by row.
func cutFainter(s *Stars, rep *Report, maxV float64) {
	if maxV == 0 || math.IsNaN(maxV) {
		return
	}
	keep := 0
	for i := range s.Vmag {
		if float64(s.Vmag[i]) <= maxV {
			keep++
		}
	}
	if keep == s.Len() {
		return
	}
	t := &Stars{Epoch: s.Epoch, Source: s.Source, Format: s.Format}
	for i := range s.Vmag {
		if float64(s.Vmag[i]) <= maxV {
			t.AppendRow(s, i)
		}
	}
	cut := s.Len() - keep
	*s = *t
	rep.Skipped += cut
	rep.Skips = append(rep.Skips, Skip{Reason: skipCut, Count: cut})
	summarise(s, rep)
}

// skipCut is the skip reason of stars fainter than ReadOptions.MaxV.
const skipCut = "fainter than the V cut"

// mergeFiles concatenates the per-file catalogues in order and sums their
// reports, checking that the formats and epochs agree.
func mergeFiles(paths []string, format Format, get func(i int) (*Stars, *Report)) (*Stars, *Report, error) {
	s0, _ := get(0)
	out := &Stars{Epoch: s0.Epoch, Format: s0.Format, Source: s0.Source}
	rep := &Report{Source: paths[0], Format: format, DeclaredRows: -1}
	if len(paths) > 1 {
		rep.Source = fmt.Sprintf("%s and %d more files", paths[0], len(paths)-1)
		out.Source = rep.Source
	}
	n := 0
	for i := range paths {
		s, r := get(i)
		if r.Format != format {
			return nil, r, &ParseError{File: paths[i], Line: 1, Err: fmt.Errorf("%w: this file is %s, the others are %s", ErrMixedFormats, r.Format, format)}
		}
		if s.Epoch != out.Epoch {
			return nil, r, &ParseError{File: paths[i], Err: fmt.Errorf("%w: positions at epoch J%g, %s's at J%g (set an epoch to propagate them to)", ErrMixedFormats, s.Epoch, paths[0], out.Epoch)}
		}
		n += s.Len()
	}
	grow := func() []float32 { return make([]float32, 0, n) }
	out.ID, out.Flags = make([]int64, 0, n), make([]Flag, 0, n)
	out.X, out.Y, out.Z, out.Dist = grow(), grow(), grow(), grow()
	out.Vmag, out.Teff, out.BV = grow(), grow(), grow()
	for i := range paths {
		s, r := get(i)
		out.appendAll(s)
		rep.Files = append(rep.Files, r)
		rep.Compressed = rep.Compressed || r.Compressed
		rep.Lines += r.Lines
		rep.Skipped += r.Skipped
		rep.Propagated = rep.Propagated || r.Propagated
		if r.DeclaredRows >= 0 {
			rep.DeclaredRows = max(rep.DeclaredRows, 0) + r.DeclaredRows
		}
		for _, sk := range r.Skips {
			merged := false
			for j := range rep.Skips {
				if rep.Skips[j].Reason == sk.Reason {
					rep.Skips[j].Count += sk.Count
					merged = true
				}
			}
			if !merged {
				if sk.File == "" && len(paths) > 1 {
					sk.File = paths[i]
				}
				rep.Skips = append(rep.Skips, sk)
			}
		}
	}
	if out.Len() == 0 {
		return nil, rep, fmt.Errorf("catalog: %s: %w (%d rows skipped)", rep.Source, ErrNoRows, rep.Skipped)
	}
	if err := out.Validate(); err != nil {
		return nil, rep, fmt.Errorf("catalog: %s: %w", rep.Source, err)
	}
	summarise(out, rep)
	return out, rep, nil
}

// appendAll appends every row of src to s exactly (see AppendRow), names
// re-indexed.
func (s *Stars) appendAll(src *Stars) {
	if src.PMRA == nil && s.PMRA == nil && src.RV == nil && s.RV == nil && len(src.Names) == 0 {
		s.ID = append(s.ID, src.ID...)
		s.X, s.Y, s.Z = append(s.X, src.X...), append(s.Y, src.Y...), append(s.Z, src.Z...)
		s.Dist, s.Vmag = append(s.Dist, src.Dist...), append(s.Vmag, src.Vmag...)
		s.Teff, s.BV = append(s.Teff, src.Teff...), append(s.BV, src.BV...)
		s.Flags = append(s.Flags, src.Flags...)
		return
	}
	for i := 0; i < src.Len(); i++ {
		s.AppendRow(src, i)
	}
}
