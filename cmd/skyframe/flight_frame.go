package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"image"
	"image/draw"
	"io"
	"math"
	"os"
	"path"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/exr"
	"github.com/skyframe/skyframe/flight"
	framefiles "github.com/skyframe/skyframe/frame"
	flightjob "github.com/skyframe/skyframe/job"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
)

// flightSidecar is the JSON written next to each flight frame: the still
// sidecar's physical state plus where the frame sits in the flight.
type flightSidecar struct {
	render.Sidecar
	Flight flightInfo `json:"flight"`
}

// flightInfo locates a frame in its flight. Times are Julian years, distances
// parsecs, rates received signals per emitted second (the Doppler factor
// toward the trajectory's start and end points).
type flightInfo struct {
	Title    string `json:"title,omitempty"`
	PlanHash string `json:"plan_hash"` // flightJob.hash: every input's identity
	// Inputs are the identities PlanHash is made of (see flightInputs).
	Inputs        map[string]string `json:"inputs,omitempty"`
	Frame         int               `json:"frame"`
	Frames        int               `json:"frames"`
	Phase         string            `json:"phase"`
	VideoSeconds  float64           `json:"video_s"`
	ShipYears     float64           `json:"tau_yr"`
	CatalogueYrs  float64           `json:"t_yr"`
	RateHome      float64           `json:"rate_home"`
	RateDest      float64           `json:"rate_dest"`
	TravelledPc   float64           `json:"travelled_pc"`
	RemainingPc   float64           `json:"remaining_pc"`
	LookKey       string            `json:"look_key"`
	RollDeg       float64           `json:"roll_deg"`
	MeanLuminance float64           `json:"mean_luminance"`
	// RegionLuminance holds the mean relative luminance of each of the
	// flashRegions² overlapping windows (see regionLuminance), row by row.
	RegionLuminance []float64 `json:"region_luminance,omitempty"`
	// Shutter is the shutter angle in degrees; BlurSamples the sub-frames
	// integrated over the exposure (1: the frame's instant only).
	Shutter     float64      `json:"shutter_deg"`
	BlurSamples int          `json:"blur_samples"`
	Files       []fileRecord `json:"files"`
}

// fileRecord names an image file of the frame (relative to the output
// directory, slash-separated) with its size and SHA-256.
type fileRecord struct {
	Kind   string `json:"kind"` // "png", "fits", "exr" or "overlay"
	Name   string `json:"name"`
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// frameFiles are the paths of one frame's files, relative to the output
// directory; empty when not written. overlay is the overlay layer's PNG.
type frameFiles struct{ png, fits, sidecar, overlay, exr string }

func (j *flightJob) files(i int) frameFiles {
	var f frameFiles
	o := j.plan.Output
	if *o.PNG {
		f.png = j.plan.FrameName(i, "")
	}
	if o.FITS {
		f.fits = j.plan.FrameName(i, ".fits")
	}
	if *o.Sidecar {
		f.sidecar = j.plan.FrameName(i, ".json")
	}
	if f.png == "" && f.fits != "" && f.sidecar == f.fits {
		f.sidecar = f.fits + ".json"
	}
	// A pattern whose file part is fixed ("{frame:05}/sky.png") ignores
	// the extension: there the FITS, sidecar and overlay layer take the
	// PNG's name with their own extension, so no two files of a frame
	// share a name.
	base := j.plan.FrameName(i, "")
	own := func(name, ext string) string {
		if name != "" && name == base && (f.png != "" || ext == ".overlay.png") {
			return strings.TrimSuffix(base, path.Ext(base)) + ext
		}
		return name
	}
	f.fits = own(f.fits, ".fits")
	f.sidecar = own(f.sidecar, ".json")
	if o.OverlayLayer {
		f.overlay = own(j.plan.FrameName(i, ".overlay.png"), ".overlay.png")
	}
	if o.EXR {
		f.exr = own(j.plan.FrameName(i, ".exr"), ".exr")
	}
	return f
}

// outFile is one file a frame writes: which writer, and where (relative
// to the output directory, slash-separated).
type outFile struct{ what, rel string }

// list names every file of the frame, for every writer. A new writer adds
// its file here so that checkOutputNames covers it.
func (f frameFiles) list() []outFile {
	var out []outFile
	for _, c := range []outFile{{"PNG", f.png}, {"FITS", f.fits}, {"EXR", f.exr}, {"overlay layer", f.overlay}, {"sidecar", f.sidecar}} {
		if c.rel != "" {
			out = append(out, c)
		}
	}
	return out
}

// checkOutputNames refuses, before anything renders, a frame-name pattern
// under which two files would share a path: two writers of one frame
// (output.frames = "frames/{frame}.json" names the PNG like the sidecar,
// which would be written last over it) or files of different frames. It
// compares the files of the first two and last two frames of the plan,
// which any clash between frame numbers of different widths shows.
func (j *flightJob) checkOutputNames(planPath string) error {
	total := j.plan.Frames()
	seen := map[string]string{}
	for _, i := range []int{0, 1, total - 2, total - 1} {
		if i < 0 || i >= total {
			continue
		}
		for _, f := range j.files(i).list() {
			key := path.Clean(f.rel)
			this := fmt.Sprintf("frame %d's %s", i, f.what)
			if prev, dup := seen[key]; dup && prev != this {
				return usagef("%s: output.frames %q: %s and %s would both be %s; use a pattern whose extension no other output uses, such as \"frames/{frame:05}.png\"",
					planPath, j.plan.Output.Frames, prev, this, f.rel)
			}
			seen[key] = this
		}
	}
	return nil
}

func (j *flightJob) path(rel string) string { return filepath.Join(j.outDir, filepath.FromSlash(rel)) }

// signalRates are the received rates of once-per-second signals from home
// (the trajectory's start point) and the destination (its end point), as in
// flight.WriteDryRunCSV.
func signalRates(tr *flight.Trajectory, s flight.State) (home, dest float64) {
	toHome, toDest := r3.Sub(tr.Home(), s.Pos), r3.Sub(tr.Destination(), s.Pos)
	home, dest = s.DopplerBehind(), s.DopplerAhead()
	if r3.Norm(toHome) > 0 {
		home = s.Doppler(toHome)
	}
	if r3.Norm(toDest) > 0 {
		dest = s.Doppler(toDest)
	}
	return home, dest
}

func sha256Hex(b []byte) string { return flightjob.SHA256(b) }

// renderFrame renders frame i and writes its files, each atomically, the
// sidecar last so that its presence marks a complete frame. It returns the
// frame's luminance for the flash check.
func (j *flightJob) renderFrame(prep *render.Prepared, enc *render.PNGEncoder, i int) (flightjob.Lum, error) {
	fs, err := j.plan.FrameState(i)
	if err != nil {
		return flightjob.Lum{}, err
	}
	obs, err := flight.Observer(fs.State)
	if err != nil {
		return flightjob.Lum{}, fmt.Errorf("flight: frame %d: %w", i, err)
	}
	proj, err := j.projection(fs)
	if err != nil {
		return flightjob.Lum{}, fmt.Errorf("flight: frame %d: %w", i, err)
	}
	fr := j.frame
	frame, lay, kept, blur, err := j.renderLinear(prep, fs, obs, proj)
	if err != nil {
		return flightjob.Lum{}, fmt.Errorf("flight: frame %d: %w", i, err)
	}
	side := frame.Sidecar("skyframe", version, j.stars, fr.Tone)
	lay.sidecarInfo(&side)
	img8 := frame.ToNRGBA(fr.Tone)
	lum := flightjob.MeanLuminance(img8)
	var img draw.Image = img8
	if fr.Depth == 16 {
		img = frame.ToNRGBA64(fr.Tone)
	}
	ff := j.files(i)
	var layer image.Image
	if ff.overlay != "" {
		over, err := overlay.Layer(frame, j.stars, lay.Options)
		if err != nil {
			return flightjob.Lum{}, fmt.Errorf("flight: frame %d: %w", i, err)
		}
		layer = overlay.Straight(over)
	} else if err := overlay.Draw(img, frame, j.stars, lay.Options); err != nil {
		return flightjob.Lum{}, fmt.Errorf("flight: frame %d: %w", i, err)
	}
	home, dest := signalRates(j.plan.Trajectory(), fs.State)
	info := flightInfo{
		Title: j.plan.Title, PlanHash: j.hash, Inputs: j.inputs, Frame: i, Frames: j.plan.Frames(), Phase: fs.Phase.String(),
		VideoSeconds: fs.Seconds, ShipYears: fs.State.Tau, CatalogueYrs: fs.State.T,
		RateHome: home, RateDest: dest, TravelledPc: fs.State.Travelled, RemainingPc: fs.State.Remaining,
		LookKey: fs.Look.Look, RollDeg: fs.Roll, MeanLuminance: lum.Mean, RegionLuminance: lum.Regions,
		Shutter: fr.Shutter, BlurSamples: len(blur),
	}
	spec := &frameSpec{proj: proj, opt: frame.Options, tone: fr.Tone, depth: fr.Depth, lookDesc: fs.Look.Look, source: "skyframe flight",
		credit: namesCredit(j.index, labelsShown(lay.Labels)), layers: lay}
	sc := &scene{stars: j.stars, index: j.index, observer: obs, heading: fs.State.Dir}
	if ff.png != "" {
		meta := append(pngMeta(side, spec),
			render.KV{Key: "skyframe:frame", Value: strconv.Itoa(i)},
			render.KV{Key: "skyframe:plan_hash", Value: j.hash})
		var buf bytes.Buffer
		if err := enc.Encode(&buf, img, meta); err != nil {
			return flightjob.Lum{}, fmt.Errorf("flight: frame %d: %w", i, err)
		}
		if err := j.writeFile(ff.png, buf.Bytes()); err != nil {
			return flightjob.Lum{}, err
		}
		info.Files = append(info.Files, fileRecord{Kind: "png", Name: ff.png, Bytes: int64(buf.Len()), SHA256: sha256Hex(buf.Bytes())})
	}
	if layer != nil {
		meta := append(pngMeta(side, spec),
			render.KV{Key: "skyframe:frame", Value: strconv.Itoa(i)},
			render.KV{Key: "skyframe:plan_hash", Value: j.hash},
			render.KV{Key: "Description", Value: "skyframe overlays alone (sRGB, straight alpha)"})
		var buf bytes.Buffer
		if err := enc.Encode(&buf, layer, meta); err != nil {
			return flightjob.Lum{}, fmt.Errorf("flight: frame %d: overlay layer: %w", i, err)
		}
		if err := j.writeFile(ff.overlay, buf.Bytes()); err != nil {
			return flightjob.Lum{}, err
		}
		info.Files = append(info.Files, fileRecord{Kind: "overlay", Name: ff.overlay, Bytes: int64(buf.Len()), SHA256: sha256Hex(buf.Bytes())})
	}
	if ff.fits != "" {
		cards, err := fitsCards(frame, sc, spec)
		if err != nil {
			return flightjob.Lum{}, fmt.Errorf("flight: frame %d: %w", i, err)
		}
		cards = append(cards, render.Card{Key: "FRAME", Value: i, Comment: "frame index in the flight"})
		var buf bytes.Buffer
		if err := render.WriteFITS(&buf, frame.W, frame.H, frame.Pix, cards); err != nil {
			return flightjob.Lum{}, fmt.Errorf("flight: frame %d: %w", i, err)
		}
		if err := j.writeFile(ff.fits, buf.Bytes()); err != nil {
			return flightjob.Lum{}, err
		}
		info.Files = append(info.Files, fileRecord{Kind: "fits", Name: ff.fits, Bytes: int64(buf.Len()), SHA256: sha256Hex(buf.Bytes())})
	}
	if ff.exr != "" {
		b, err := j.frameEXR(frame, kept, side, lay, layer)
		if err != nil {
			return flightjob.Lum{}, fmt.Errorf("flight: frame %d: %w", i, err)
		}
		if err := j.writeFile(ff.exr, b); err != nil {
			return flightjob.Lum{}, err
		}
		info.Files = append(info.Files, fileRecord{Kind: "exr", Name: ff.exr, Bytes: int64(len(b)), SHA256: sha256Hex(b)})
	}
	if ff.sidecar != "" {
		data, err := json.MarshalIndent(flightSidecar{Sidecar: side, Flight: info}, "", "  ")
		if err != nil {
			return flightjob.Lum{}, fmt.Errorf("flight: frame %d: sidecar: %w", i, err)
		}
		if err := j.writeFile(ff.sidecar, append(sealJSON(data), '\n')); err != nil {
			return flightjob.Lum{}, err
		}
	}
	return lum, nil
}

// writeFile writes data to the output-relative path rel atomically,
// creating its directory.
func (j *flightJob) writeFile(rel string, data []byte) error {
	p := j.path(rel)
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		return err
	}
	return render.WriteFileAtomic(p, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// frameStatus is what checkFrame found for one frame.
type frameStatus int

const (
	frameIntact frameStatus = iota
	frameMissing
	frameCorrupt
)

// checkFrame reports whether frame i is complete and intact: its sidecar
// parses, records this plan's hash and frame index, and every image file it
// lists exists with the recorded size and SHA-256. It returns the recorded
// mean luminance and, when not intact, the reason.
func (j *flightJob) checkFrame(i int) (frameStatus, flightjob.Lum, string) {
	ff := j.files(i)
	data, err := os.ReadFile(j.path(ff.sidecar))
	if os.IsNotExist(err) {
		return frameMissing, flightjob.Lum{}, "no sidecar " + ff.sidecar
	}
	if err != nil {
		return frameCorrupt, flightjob.Lum{}, err.Error()
	}
	if err := checkSeal(data); err != nil {
		return frameCorrupt, flightjob.Lum{}, ff.sidecar + ": " + err.Error()
	}
	var side flightSidecar
	if err := json.Unmarshal(data, &side); err != nil {
		return frameCorrupt, flightjob.Lum{}, ff.sidecar + ": " + err.Error()
	}
	fl := side.Flight
	if fl.PlanHash != j.hash {
		why := j.inputs.changed(fl.Inputs)
		if why == "" {
			why = "another plan or preview setting"
		}
		return frameCorrupt, flightjob.Lum{}, fmt.Sprintf("%s: made from different inputs: %s (hash %.12s…, now %.12s…)", ff.sidecar, why, fl.PlanHash, j.hash)
	}
	if fl.Frame != i {
		return frameCorrupt, flightjob.Lum{}, fmt.Sprintf("%s: records frame %d", ff.sidecar, fl.Frame)
	}
	want := map[string]string{"png": ff.png, "fits": ff.fits, "overlay": ff.overlay, "exr": ff.exr}
	seen := 0
	for _, rec := range fl.Files {
		name, ok := want[rec.Kind]
		if !ok || name == "" || rec.Name != name {
			return frameCorrupt, flightjob.Lum{}, fmt.Sprintf("%s: unexpected file record %s %q", ff.sidecar, rec.Kind, rec.Name)
		}
		seen++
		b, err := os.ReadFile(j.path(name))
		if os.IsNotExist(err) {
			return frameMissing, flightjob.Lum{}, "no " + name
		}
		if err != nil {
			return frameCorrupt, flightjob.Lum{}, err.Error()
		}
		if int64(len(b)) != rec.Bytes || sha256Hex(b) != rec.SHA256 {
			return frameCorrupt, flightjob.Lum{}, fmt.Sprintf("%s: %d bytes, SHA-256 does not match the sidecar", name, len(b))
		}
	}
	if n := btoi(ff.png != "") + btoi(ff.fits != "") + btoi(ff.overlay != "") + btoi(ff.exr != ""); seen != n {
		return frameCorrupt, flightjob.Lum{}, fmt.Sprintf("%s: lists %d image files, the plan writes %d", ff.sidecar, seen, n)
	}
	regions := fl.RegionLuminance
	if len(regions) != flightjob.Regions*flightjob.Regions {
		regions = nil // recorded without it, or damaged: whole-frame check only
	}
	return frameIntact, flightjob.Lum{Mean: fl.MeanLuminance, Regions: regions}, ""
}

func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}

// removeStaleTemps deletes temporary files that an interrupted writer of
// frame i left behind (see flightjob.RemoveStaleTemps). Only this frame's
// names are touched, so shards sharing a directory never remove each
// other's files in flight.
func (j *flightJob) removeStaleTemps(i int) error {
	ff := j.files(i)
	return flightjob.RemoveStaleTemps(j.outDir, ff.png, ff.fits, ff.sidecar, ff.overlay, ff.exr)
}

// renderLinear renders the linear buffer of frame state fs (observer obs,
// projection proj) with its layers, integrated over the shutter: the mean
// of the sub-frames flight.Plan.BlurSamples asks for, each a full render of
// its instant (stars and diffuse layers), summed in a fixed order so the
// result depends only on the plan and the frame. The frame's options,
// projection and observer are those of the frame's own instant, and its
// star statistics those of the sub-frame nearest to it.
func (j *flightJob) renderLinear(prep *render.Prepared, fs flight.FrameState, obs camera.Observer, proj camera.Projection) (*render.Frame, layerSet, []render.Contribution, []float64, error) {
	fr := j.frame
	// keep: an unblurred frame with an EXR file keeps its linear
	// contributions apart and its Doppler channel (a blurred frame's EXR
	// has the combined light only).
	one := func(fs flight.FrameState, obs camera.Observer, proj camera.Projection, keep bool) (*render.Frame, layerSet, []render.Contribution, error) {
		opt := render.Options{Projection: proj, Observer: obs, Beaming: fr.Beaming, FWHM: fr.FWHM,
			Exposure: fs.Camera.Exposure, Limit: fr.Limit, Color: spectrum.ColorOptions{White: fr.White}, Workers: j.workers,
			Doppler: keep && (j.exr.Layers == nil || slices.Contains(j.exr.Layers, framefiles.EXRDoppler))}
		frame, err := prep.Render(opt)
		if err != nil {
			return nil, layerSet{}, nil, err
		}
		lay := j.frameLayers(fs, obs)
		var kept []render.Contribution
		if keep {
			kept, err = lay.AddLinearKept(frame)
		} else {
			err = lay.AddLinear(frame)
		}
		if err != nil {
			return nil, layerSet{}, nil, err
		}
		return frame, lay, kept, nil
	}
	offsets, _, err := j.plan.BlurSamples(fs.Index, fr.Shutter, fr.FWHM, j.projection)
	if err != nil {
		return nil, layerSet{}, nil, nil, err
	}
	if len(offsets) == 1 && offsets[0] == 0 {
		frame, lay, kept, err := one(fs, obs, proj, j.plan.Output.EXR)
		return frame, lay, kept, offsets, err
	}
	var acc []float32
	var nearest *render.Frame
	best := math.Inf(1)
	for _, dt := range offsets {
		fsk, err := j.plan.FrameStateAt(fs.Index, dt)
		if err != nil {
			return nil, layerSet{}, nil, nil, err
		}
		obsk, err := flight.Observer(fsk.State)
		if err != nil {
			return nil, layerSet{}, nil, nil, err
		}
		projk, err := j.projection(fsk)
		if err != nil {
			return nil, layerSet{}, nil, nil, err
		}
		fk, _, _, err := one(fsk, obsk, projk, false)
		if err != nil {
			return nil, layerSet{}, nil, nil, err
		}
		if acc == nil {
			acc = fk.Pix
		} else {
			for p, v := range fk.Pix {
				acc[p] += v
			}
		}
		if math.Abs(dt) < best {
			best, nearest = math.Abs(dt), fk
		}
	}
	inv := float32(1 / float64(len(offsets)))
	for p := range acc {
		acc[p] *= inv
	}
	frame := nearest
	frame.Pix = acc
	frame.Doppler = nil
	frame.Options.Projection, frame.Options.Observer, frame.Options.Exposure = proj, obs, fs.Camera.Exposure
	lay := j.frameLayers(fs, obs)
	return frame, lay, nil, offsets, nil
}

// frameEXR encodes a flight frame's OpenEXR file: the frame, its kept
// linear contributions, the overlays alone (the overlay layer when the plan
// writes one, else drawn here on a transparent image) and the physical
// state, at the plan's frame rate.
func (j *flightJob) frameEXR(f *render.Frame, kept []render.Contribution, side render.Sidecar, lay layerSet, layer image.Image) ([]byte, error) {
	in := framefiles.EXRInput{Frame: f, Contributions: kept, Sidecar: side}
	ov, ok := layer.(*image.NRGBA)
	if !ok {
		ov = image.NewNRGBA(image.Rect(0, 0, f.W, f.H))
		if err := overlay.Draw(ov, f, j.stars, lay.Options); err != nil {
			return nil, err
		}
	}
	for i := 3; i < len(ov.Pix); i += 4 {
		if ov.Pix[i] != 0 {
			in.Overlay = ov
			break
		}
	}
	img, err := framefiles.EXRImage(in, j.exr)
	if err != nil {
		return nil, fmt.Errorf("camera.exr_layers: %w", err)
	}
	enc := exr.Encoder{Compression: j.exr.Compression, Workers: j.workers}
	var buf bytes.Buffer
	if err := enc.Encode(&buf, img); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
