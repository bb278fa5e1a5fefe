package job

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
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/exr"
	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/imgfile"
	"github.com/skyframe/skyframe/internal/keep"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/sky"
	"github.com/skyframe/skyframe/spectrum"
)

// Job is a parsed, bound and checked flight plan with everything a render,
// resume or verification needs. The command fills it in from its flags
// and the plan, then calls CheckCamera (and Preview for a reduced render)
// before anything renders.
type Job struct {
	Plan   *flight.Plan
	Hash   string // identity of everything that makes the frames (Inputs.Hash, Preview)
	Inputs Inputs // what went into Hash, recorded in each sidecar
	// Stars are the rows every frame's catalogue starts with (Sky.Base,
	// the catalogue with the Sun); Index finds stars among them.
	Stars *catalog.Stars
	Index *names.Index
	// Sky gives each frame its catalogue: Stars, and for the built-in sky
	// the fainter stars as deep as the frame needs (sky.Source.Frame); nil
	// draws Stars as they are in every frame.
	Sky *sky.Source
	// Unresolved builds the unresolved-light maps for the depth each frame
	// of the built-in sky draws to, when UnresolvedFollows: the layer is on
	// without a fixed depth, so it takes over where the frame's stars stop.
	Unresolved        *sky.UnresolvedMaps
	UnresolvedFollows bool
	// Completeness, when set, receives each rendered frame's completeness
	// report (the command warns about the worst).
	Completeness func(frame int, r sky.Report)
	OutDir       string
	Frames       []int // the frames this job handles, ascending
	Shard        flight.Shard
	Frame        frameopt.Frame // the plan's frame options, parsed (a preview's size)
	Every        int            // every Nth frame only (Preview); 0 or 1: all
	// ExtendedScale is a preview's render.Options.ExtendedScale: the
	// solid angle of a full frame's pixel over a preview pixel's (Preview);
	// 0 for full frames.
	ExtendedScale float64
	// Workers bounds the goroutines per frame for rendering and encoding
	// (0: all CPUs); the bytes written do not depend on it.
	Workers int
	// Layers are the plan's layers and overlays (FrameLayers specialises
	// them to a frame).
	Layers frame.Layers
	// EXR is the OpenEXR content of each frame (output.exr).
	EXR frame.EXROptions
	// Version is the tool version recorded in the files.
	Version string
	// Credit is the attribution of the star names the labels show,
	// recorded in the PNG; empty: none shown.
	Credit string
	// FreeSpace reports the bytes free on the file system holding a
	// directory; nil: the operating system's figure (FreeSpace).
	FreeSpace func(dir string) (uint64, error)
}

// Paths are the paths of one frame's files, relative to the output
// directory and slash-separated; empty when not written. Overlay is the
// overlay layer's PNG.
type Paths struct{ PNG, FITS, Sidecar, Overlay, EXR string }

// Files returns the paths of frame i's files.
func (j *Job) Files(i int) Paths {
	var f Paths
	o := j.Plan.Output
	if *o.PNG {
		f.PNG = j.Plan.FrameName(i, "")
	}
	if o.FITS {
		f.FITS = j.Plan.FrameName(i, ".fits")
	}
	if *o.Sidecar {
		f.Sidecar = j.Plan.FrameName(i, ".json")
	}
	if f.PNG == "" && f.FITS != "" && f.Sidecar == f.FITS {
		f.Sidecar = f.FITS + ".json"
	}
	// A pattern whose file part is fixed ("{frame:05}/sky.png") ignores
	// the extension: there the FITS, sidecar and overlay layer take the
	// PNG's name with their own extension, so no two files of a frame
	// share a name.
	base := j.Plan.FrameName(i, "")
	own := func(name, ext string) string {
		if name != "" && name == base && (f.PNG != "" || ext == ".overlay.png") {
			return strings.TrimSuffix(base, path.Ext(base)) + ext
		}
		return name
	}
	f.FITS = own(f.FITS, ".fits")
	f.Sidecar = own(f.Sidecar, ".json")
	if o.OverlayLayer {
		f.Overlay = own(j.Plan.FrameName(i, ".overlay.png"), ".overlay.png")
	}
	if o.EXR {
		f.EXR = own(j.Plan.FrameName(i, ".exr"), ".exr")
	}
	return f
}

// OutFile is one file a frame writes: which writer, and where (relative
// to the output directory, slash-separated).
type OutFile struct{ What, Rel string }

// List names every file of the frame, for every writer. A new writer adds
// its file here so that CheckOutputNames covers it.
func (f Paths) List() []OutFile {
	var out []OutFile
	for _, c := range []OutFile{{"PNG", f.PNG}, {"FITS", f.FITS}, {"EXR", f.EXR}, {"overlay layer", f.Overlay}, {"sidecar", f.Sidecar}} {
		if c.Rel != "" {
			out = append(out, c)
		}
	}
	return out
}

// CheckOutputNames refuses, before anything renders, a frame-name pattern
// under which two files would share a path: two writers of one frame
// (output.frames = "frames/{frame}.json" names the PNG like the sidecar,
// which would be written last over it) or files of different frames. It
// compares the files of the first two and last two frames of the plan,
// which any clash between frame numbers of different widths shows.
// planPath names the plan in the message.
func (j *Job) CheckOutputNames(planPath string) error {
	total := j.Plan.Frames()
	seen := map[string]string{}
	for _, i := range []int{0, 1, total - 2, total - 1} {
		if i < 0 || i >= total {
			continue
		}
		for _, f := range j.Files(i).List() {
			key := path.Clean(f.Rel)
			this := fmt.Sprintf("frame %d's %s", i, f.What)
			if prev, dup := seen[key]; dup && prev != this {
				return inputf("%s: output.frames %q: %s and %s would both be %s; use a pattern whose extension no other output uses, such as \"frames/{frame:05}.png\"",
					planPath, j.Plan.Output.Frames, prev, this, f.Rel)
			}
			seen[key] = this
		}
	}
	return nil
}

// Path is the operating-system path of the output-relative name rel.
func (j *Job) Path(rel string) string { return filepath.Join(j.OutDir, filepath.FromSlash(rel)) }

// SignalRates are the received rates of once-per-second signals from home
// (the trajectory's start point) and the destination (its end point), as
// in flight.WriteDryRunCSV.
func SignalRates(tr *flight.Trajectory, s flight.State) (home, dest float64) {
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

// Preview turns the job into a reduced render: frames scaled by scale
// (0 < scale ≤ 1; a cube keeps Width = 6·Height) and only every Nth frame
// (frames keep their numbers). Its sidecars record a hash of their own, so
// resume and verify in the preview directory never take a preview frame
// for a full one, or one preview for another. Call it after CheckCamera.
//
// Point stars keep their peak in a preview (the PSF's width is in pixels),
// and extended light — the Sun's and the destination's discs, the CMB, the
// unresolved starlight — keeps the full frame's value per pixel: its light
// is scaled by the ratio of the pixels' solid angles (ExtendedScale), so a
// preview shows what the frames will, not the Milky Way and discs 1/scale²
// times brighter.
func (j *Job) Preview(scale float64, every int) {
	fr := &j.Frame
	w0, h0 := fr.Width, fr.Height
	fr.Width = max(1, int(math.Round(float64(fr.Width)*scale)))
	fr.Height = max(1, int(math.Round(float64(fr.Height)*scale)))
	if fr.Kind == camera.Cube {
		fr.Width = 6 * fr.Height
	}
	j.ExtendedScale = pixelAreaRatio(fr.Kind, w0, h0, fr.Width, fr.Height)
	j.Hash = SHA256([]byte(fmt.Sprintf("%s preview scale %v every %d", j.Hash, scale, every)))
}

// pixelAreaRatio returns the solid angle of a pixel of a w0×h0 frame of
// the given kind over that of a w×h one at the same field (1/16 for a
// quarter-size preview): the pixel scale goes as 1/W for a pinhole (its
// field is horizontal), 1/min(W, H) for a fisheye (its circle fits the
// shorter side), 1/H for a cube strip (faces H pixels square) and as 1/W
// by 1/H for an equirect frame.
func pixelAreaRatio(kind camera.Kind, w0, h0, w, h int) float64 {
	r := func(a0, a int) float64 { return float64(a) / float64(a0) }
	switch kind {
	case camera.Pinhole:
		return r(w0, w) * r(w0, w)
	case camera.Fisheye:
		return r(min(w0, h0), min(w, h)) * r(min(w0, h0), min(w, h))
	case camera.Cube:
		return r(h0, h) * r(h0, h)
	}
	return r(w0, w) * r(h0, h)
}

// CheckCamera parses the plan's frame options into j.Frame (and the
// OpenEXR options when the plan writes EXR) and builds the first frame's
// camera, so that a projection the plan's values cannot make is reported
// before anything renders.
func (j *Job) CheckCamera() error {
	j.Frame = j.Plan.Frame.Frame()
	if j.Plan.Output.EXR {
		x, err := j.Plan.Frame.EXR()
		if err != nil {
			return inputf("%s: camera.exr_*: %v", j.Plan.Name, err)
		}
		x.FPS = j.Plan.Show.FPS
		j.EXR = x
	}
	fsx, err := j.Plan.FrameState(0)
	if err != nil {
		return err
	}
	if _, err := j.Projection(fsx); err != nil {
		return inputf("%s: camera: %v", j.Plan.Name, err)
	}
	return nil
}

// Projection builds the prepared camera projection of a frame.
func (j *Job) Projection(fs flight.FrameState) (camera.Projection, error) {
	fr := j.Frame
	p := camera.Projection{Kind: fr.Kind, Width: fr.Width, Height: fr.Height, FOV: fs.Camera.FOV, Tilt: fs.Camera.Tilt, Orient: fs.Camera.Orient}
	if err := p.Prepare(); err != nil {
		return camera.Projection{}, err
	}
	return p, nil
}

// starFinder looks stars up in the job's catalogue through its names index.
func (j *Job) starFinder() frameopt.StarFinder {
	return func(name string) (r3.Vec, float64, bool) {
		i, err := j.Index.Find(name)
		if err != nil {
			return r3.Vec{}, 0, false
		}
		st := j.Stars.At(i)
		return r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}, st.Dist, true
	}
}

// FrameLayers specialises the plan's layers to frame fs seen by obs: the
// destination marker and HUD follow the ship.
func (j *Job) FrameLayers(fs flight.FrameState, obs camera.Observer) frame.Layers {
	l := j.Layers
	tr := j.Plan.Trajectory()
	if md := j.Plan.Frame.MarkDestination; md != "" {
		if d, err := frameopt.ParseDirection(md, frameopt.PointDir); err == nil {
			if u, err := d.CatalogueDir(obs, fs.State.Dir, j.starFinder()); err == nil {
				l.Markers.Destination = &u
			}
		}
	} else if l.Markers.Motion {
		d := r3.Sub(tr.Destination(), fs.State.Pos)
		if n := r3.Norm(d); n > 0 {
			u := r3.Scale(1/n, d)
			l.Markers.Destination = &u
		}
	}
	if l.HUD != nil {
		v := overlay.NoHUDValues()
		v.Title = j.Plan.Title
		if j.Plan.Frame.HUDTitle != "" {
			v.Title = j.Plan.Frame.HUDTitle
		}
		v.Beta, v.Gamma = fs.State.Beta, fs.State.Gamma
		v.TauYears, v.TYears = fs.State.Tau, fs.State.T
		v.TravelledLy = fs.State.Travelled / flight.LightYearPc
		v.RemainingLy = fs.State.Remaining / flight.LightYearPc
		v.RateHome, v.RateDest = SignalRates(tr, fs.State)
		l.HUD = &v
	}
	l.Lattice.Origin = tr.Start().Pos
	return l
}

// RenderFrame renders frame i and writes its files, each atomically, the
// sidecar last so that its presence marks a complete frame. It returns
// the frame's luminance for the flash check.
func (j *Job) RenderFrame(prep *render.Prepared, enc *imgfile.PNGEncoder, i int) (Lum, error) {
	d, err := j.drawFrame(prep, i, false)
	if err != nil {
		return Lum{}, err
	}
	if err := j.writeFrame(d, enc); err != nil {
		return Lum{}, err
	}
	return d.lum, nil
}

// drawnFrame is a frame drawn and ready to be written (drawFrame): its
// image with the overlays, its overlay layer, its FITS and OpenEXR files
// encoded (they need the linear frame, which drawFrame hands on to the
// next frame), and what its PNG and sidecar record.
type drawnFrame struct {
	i     int
	img   draw.Image   // the 8- or 16-bit image the PNG is encoded from
	img8  *image.NRGBA // the kept 8-bit image, returned by release
	layer *image.NRGBA // the overlay layer, when the plan writes one
	fits  *bytes.Buffer
	exr   []byte
	meta  []imgfile.KV // PNG text: the sidecar's and the frame's
	side  render.Sidecar
	info  Info
	lum   Lum
}

// release returns the frame's kept buffers for the next frames.
func (d *drawnFrame) release() {
	if d.img8 != nil {
		images.Put(d.img8)
		d.img8 = nil
	}
	if d.fits != nil {
		buffers.Put(d.fits)
		d.fits = nil
	}
}

// drawFrame renders frame i up to its files' contents: the linear frame,
// the tone-mapped image and its luminance, the overlays, and the FITS and
// OpenEXR files. writeFrame encodes the PNG files and writes everything.
// With held, the unresolved layer is left to the tone map when the memo
// holds it (RunOptions.HeldLayer).
func (j *Job) drawFrame(prep *render.Prepared, i int, held bool) (*drawnFrame, error) {
	fs, err := j.Plan.FrameState(i)
	if err != nil {
		return nil, err
	}
	obs, err := flight.Observer(fs.State)
	if err != nil {
		return nil, fmt.Errorf("flight: frame %d: %w", i, err)
	}
	proj, err := j.Projection(fs)
	if err != nil {
		return nil, fmt.Errorf("flight: frame %d: %w", i, err)
	}
	fr := j.Frame
	jf, stars, prep, rep, err := j.frameSky(prep, i, fs, obs, proj)
	if err != nil {
		return nil, fmt.Errorf("flight: frame %d: %w", i, err)
	}
	if j.Sky != nil {
		// Nothing keeps the catalogue after the frame is drawn: the
		// labels, sidecar and files read it here.
		defer j.Sky.Release(stars)
	}
	// The frame's buffers are reused across frames (frames), like the
	// 8-bit image below: a new 4096² float buffer costs about 0.6 CPU-s
	// of page faults on first touch.
	dst := getFrame()
	defer frames.Put(dst)
	// The unresolved layer of a frame held on one view is left for the
	// tone map to add when nothing needs the linear frame whole (FITS,
	// OpenEXR and 16-bit images do): the pixels the stars leave black
	// then take the layer's kept 8-bit values (render.PendingLayer).
	ff := j.Files(i)
	lin, err := jf.renderLinear(dst, prep, fs, obs, proj, held && j.heldLayerUsable())
	defer lin.pending.Release()
	if err != nil {
		return nil, fmt.Errorf("flight: frame %d: %w", i, err)
	}
	f, lay, kept, ex := lin.f, lin.lay, lin.kept, lin.ex
	spec := &frame.Spec{Proj: proj, Opt: f.Options, Tone: fr.Tone, Depth: fr.Depth, Look: fs.Look.Look, Source: "skyframe flight",
		Credit: j.Credit, Layers: lay, EXR: j.EXR, Version: j.Version, Stars: stars, Heading: fs.State.Dir,
		Beaming: f.Options.Beaming}
	if rep != nil {
		spec.DepthV, spec.NeededV = finitePtr(rep.Have), finitePtr(rep.Threshold())
		if j.Completeness != nil {
			j.Completeness(i, *rep)
		}
	}
	d := &drawnFrame{i: i, side: spec.Sidecar(f)}
	done := false
	defer func() {
		if !done {
			d.release()
		}
	}()
	// The 8-bit image and the encoders' byte buffers are reused across
	// frames (images, buffers): allocating and first touching them anew costs
	// more than tone mapping at 4096².
	// The flash check's luminance is summed row by row as the tone map
	// finishes each row (the same sums as MeanLuminance).
	sums := newLumSums(f.W, f.H)
	// Written only as 8-bit PNG, nothing reads the buffer after the tone
	// map, and the next frame is drawn into it: it is left black on the
	// way, instead of cleared in a pass of its own.
	switch {
	case lin.pending != nil:
		lin.pending.ClearBuffer = true
		if d.img8, err = f.ToNRGBAPending(getNRGBA(), fr.Tone, lin.pending, sums.row); err != nil {
			return nil, fmt.Errorf("flight: frame %d: %w", i, err)
		}
	case j.eightBitOnly():
		d.img8 = f.ToNRGBAClearing(getNRGBA(), fr.Tone, sums.row)
	default:
		d.img8 = f.ToNRGBARows(getNRGBA(), fr.Tone, sums.row)
	}
	d.lum = sums.lum()
	d.img = d.img8
	if fr.Depth == 16 {
		d.img = spec.Image(f)
	}
	if ff.Overlay != "" {
		if d.layer, err = spec.OverlayLayer(f); err != nil {
			return nil, fmt.Errorf("flight: frame %d: %w", i, err)
		}
	} else if err := spec.DrawOverlays(d.img, f); err != nil {
		return nil, fmt.Errorf("flight: frame %d: %w", i, err)
	}
	home, dest := SignalRates(j.Plan.Trajectory(), fs.State)
	d.info = Info{
		Title: j.Plan.Title, PlanHash: j.Hash, Inputs: j.Inputs, Frame: i, Frames: j.Plan.Frames(), Phase: fs.Phase.String(),
		VideoSeconds: fs.Seconds, ShipYears: fs.State.Tau, CatalogueYrs: fs.State.T,
		RateHome: home, RateDest: dest, TravelledPc: fs.State.Travelled, RemainingPc: fs.State.Remaining,
		LookKey: fs.Look.Look, RollDeg: fs.Roll, MeanLuminance: d.lum.Mean, RegionLuminance: d.lum.Regions,
		Shutter: fr.Shutter, BlurKnots: len(ex.Knots), BlurPathPx: ex.Path,
	}
	frameKV := []imgfile.KV{{Key: "skyframe:frame", Value: strconv.Itoa(i)}, {Key: "skyframe:plan_hash", Value: j.Hash}}
	d.meta = append(spec.PNGMeta(d.side), frameKV...)
	if ff.FITS != "" {
		cards, err := spec.FITSCards(f)
		if err != nil {
			return nil, fmt.Errorf("flight: frame %d: %w", i, err)
		}
		cards = append(cards, imgfile.Card{Key: "FRAME", Value: i, Comment: "frame index in the flight"})
		d.fits = getBuffer()
		if err := imgfile.WriteFITS(d.fits, f.W, f.H, f.Pix, cards); err != nil {
			return nil, fmt.Errorf("flight: frame %d: %w", i, err)
		}
	}
	if ff.EXR != "" {
		if d.exr, err = j.frameEXR(spec, f, kept, d.side, d.layer); err != nil {
			return nil, fmt.Errorf("flight: frame %d: %w", i, err)
		}
	}
	done = true
	return d, nil
}

// writeFrame encodes frame d's PNG files and writes its files, each
// atomically, in the order PNG, overlay layer, FITS, OpenEXR, then the
// sidecar, whose presence marks a complete frame. It releases d's buffers.
func (j *Job) writeFrame(d *drawnFrame, enc *imgfile.PNGEncoder) error {
	defer d.release()
	i := d.i
	ff := j.Files(i)
	info := d.info
	if ff.PNG != "" {
		buf := getBuffer()
		defer buffers.Put(buf)
		if err := enc.Encode(buf, d.img, d.meta); err != nil {
			return fmt.Errorf("flight: frame %d: %w", i, err)
		}
		if err := j.writeFile(ff.PNG, buf.Bytes()); err != nil {
			return err
		}
		info.Files = append(info.Files, FileRecord{Kind: "png", Name: ff.PNG, Bytes: int64(buf.Len()), SHA256: SHA256(buf.Bytes())})
	}
	if d.layer != nil {
		meta := append(slices.Clip(d.meta), imgfile.KV{Key: "Description", Value: "skyframe overlays alone (sRGB, straight alpha)"})
		buf := getBuffer()
		defer buffers.Put(buf)
		if err := enc.Encode(buf, d.layer, meta); err != nil {
			return fmt.Errorf("flight: frame %d: overlay layer: %w", i, err)
		}
		if err := j.writeFile(ff.Overlay, buf.Bytes()); err != nil {
			return err
		}
		info.Files = append(info.Files, FileRecord{Kind: "overlay", Name: ff.Overlay, Bytes: int64(buf.Len()), SHA256: SHA256(buf.Bytes())})
	}
	if d.fits != nil {
		b := d.fits.Bytes()
		if err := j.writeFile(ff.FITS, b); err != nil {
			return err
		}
		info.Files = append(info.Files, FileRecord{Kind: "fits", Name: ff.FITS, Bytes: int64(len(b)), SHA256: SHA256(b)})
	}
	if d.exr != nil {
		if err := j.writeFile(ff.EXR, d.exr); err != nil {
			return err
		}
		info.Files = append(info.Files, FileRecord{Kind: "exr", Name: ff.EXR, Bytes: int64(len(d.exr)), SHA256: SHA256(d.exr)})
	}
	if ff.Sidecar != "" {
		data, err := json.MarshalIndent(Sidecar{Sidecar: d.side, Flight: info}, "", "  ")
		if err != nil {
			return fmt.Errorf("flight: frame %d: sidecar: %w", i, err)
		}
		if err := j.writeFile(ff.Sidecar, append(Seal(data), '\n')); err != nil {
			return err
		}
	}
	return nil
}

// What flights keep from frame to frame (package keep: across garbage
// collections; frames rendered concurrently take new ones when a list is
// empty): the linear frame (its buffer and the star path's memory), the
// 8-bit image, and the encoded files' bytes (PNG, overlay layer and FITS
// of one frame).
var (
	frames  keep.List[*render.Frame]
	images  = keep.List[*image.NRGBA]{Max: 2}  // one drawn, one being written
	buffers = keep.List[*bytes.Buffer]{Max: 6} // PNG, overlay layer and FITS, twice
)

// getFrame returns a kept frame, or a new empty one.
func getFrame() *render.Frame {
	if f, ok := frames.Get(); ok {
		return f
	}
	return new(render.Frame)
}

// getNRGBA returns a kept image, or nil (ToNRGBAInto then allocates one;
// it also replaces one of the wrong size).
func getNRGBA() *image.NRGBA {
	img, _ := images.Get()
	return img
}

// getBuffer returns an empty kept buffer or a new one.
func getBuffer() *bytes.Buffer {
	b, ok := buffers.Get()
	if !ok {
		return new(bytes.Buffer)
	}
	b.Reset()
	return b
}

// writeFile writes data to the output-relative path rel atomically,
// creating its directory.
func (j *Job) writeFile(rel string, data []byte) error {
	p := j.Path(rel)
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		return err
	}
	return render.WriteFileAtomic(p, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// Status is what CheckFrame found for one frame.
type Status int

// Statuses of CheckFrame.
const (
	Intact Status = iota
	Missing
	Corrupt
)

// CheckFrame reports whether frame i is complete and intact: its sidecar's
// seal checks, it records this job's hash and frame index, and every image
// file it lists exists with the recorded size and SHA-256. It returns the
// recorded luminance and, when not intact, the reason.
func (j *Job) CheckFrame(i int) (Status, Lum, string) {
	ff := j.Files(i)
	data, err := os.ReadFile(j.Path(ff.Sidecar))
	if os.IsNotExist(err) {
		return Missing, Lum{}, "no sidecar " + ff.Sidecar
	}
	if err != nil {
		return Corrupt, Lum{}, err.Error()
	}
	if err := CheckSeal(data); err != nil {
		return Corrupt, Lum{}, ff.Sidecar + ": " + err.Error()
	}
	var side Sidecar
	if err := json.Unmarshal(data, &side); err != nil {
		return Corrupt, Lum{}, ff.Sidecar + ": " + err.Error()
	}
	fl := side.Flight
	if fl.PlanHash != j.Hash {
		why := j.Inputs.Changed(fl.Inputs)
		if why == "" {
			why = "another plan or preview setting"
		}
		return Corrupt, Lum{}, fmt.Sprintf("%s: made from different inputs: %s (hash %.12s…, now %.12s…)", ff.Sidecar, why, fl.PlanHash, j.Hash)
	}
	if fl.Frame != i {
		return Corrupt, Lum{}, fmt.Sprintf("%s: records frame %d", ff.Sidecar, fl.Frame)
	}
	want := map[string]string{"png": ff.PNG, "fits": ff.FITS, "overlay": ff.Overlay, "exr": ff.EXR}
	seen := 0
	for _, rec := range fl.Files {
		name, ok := want[rec.Kind]
		if !ok || name == "" || rec.Name != name {
			return Corrupt, Lum{}, fmt.Sprintf("%s: unexpected file record %s %q", ff.Sidecar, rec.Kind, rec.Name)
		}
		seen++
		b, err := os.ReadFile(j.Path(name))
		if os.IsNotExist(err) {
			return Missing, Lum{}, "no " + name
		}
		if err != nil {
			return Corrupt, Lum{}, err.Error()
		}
		if int64(len(b)) != rec.Bytes || SHA256(b) != rec.SHA256 {
			return Corrupt, Lum{}, fmt.Sprintf("%s: %d bytes, SHA-256 does not match the sidecar", name, len(b))
		}
	}
	n := 0
	for _, s := range []string{ff.PNG, ff.FITS, ff.Overlay, ff.EXR} {
		if s != "" {
			n++
		}
	}
	if seen != n {
		return Corrupt, Lum{}, fmt.Sprintf("%s: lists %d image files, the plan writes %d", ff.Sidecar, seen, n)
	}
	regions := fl.RegionLuminance
	if len(regions) != Regions*Regions {
		regions = nil // recorded without it, or damaged: whole-frame check only
	}
	return Intact, Lum{Mean: fl.MeanLuminance, Regions: regions}, ""
}

// RemoveFrameTemps deletes temporary files that an interrupted writer of
// the frames given left behind (see RemoveStaleTemps), reading each
// directory once. Only these frames' names are touched, so shards sharing
// a directory never remove each other's files in flight.
func (j *Job) RemoveFrameTemps(frames ...int) error {
	var names []string
	for _, i := range frames {
		ff := j.Files(i)
		names = append(names, ff.PNG, ff.FITS, ff.Sidecar, ff.Overlay, ff.EXR)
	}
	return RemoveStaleTemps(j.OutDir, names...)
}

// RenderLinear renders the linear buffer of frame state fs (observer obs,
// projection proj) with its layers, integrated over the shutter as
// PlanExposure plans it: the instant alone when nothing moves (or the
// shutter is closed), else every star streaked along its apparent path
// between the exposure's knots (render.Prepared.RenderMotion) and the
// diffuse layers averaged over their instants
// (render.Layers.AddLinearMotion). The result depends only on the plan
// and the frame. The frame's options, projection, observer and star
// statistics are those of its own instant. With an EXR file it keeps the
// linear contributions apart and the Doppler channel.
func (j *Job) RenderLinear(prep *render.Prepared, fs flight.FrameState, obs camera.Observer, proj camera.Projection) (*render.Frame, frame.Layers, []render.Contribution, Exposure, error) {
	l, err := j.renderLinear(nil, prep, fs, obs, proj, false)
	return l.f, l.lay, l.kept, l.ex, err
}

// linearFrame is a frame's linear buffer as renderLinear leaves it: the
// frame, its layers, its contributions kept apart (OpenEXR), its exposure,
// and its unresolved layer when left pending.
type linearFrame struct {
	f       *render.Frame
	lay     frame.Layers
	kept    []render.Contribution
	ex      Exposure
	pending *render.PendingLayer
}

// renderLinear is RenderLinear drawing into dst (render.Prepared.RenderInto,
// RenderMotionInto: bit-identical), or into a new frame when dst is nil.
// With pend, an instant's unresolved layer is left pending when the memo
// holds it (render.Layers.AddLinearPending): the caller tone-maps the
// frame with it (render.Frame.ToNRGBAPending) and releases it.
func (j *Job) renderLinear(dst *render.Frame, prep *render.Prepared, fs flight.FrameState, obs camera.Observer, proj camera.Projection, pend bool) (linearFrame, error) {
	fr := j.Frame
	keep := j.Plan.Output.EXR
	opt := j.instantOptions(fs, obs, proj)
	opt.Doppler = keep && (j.EXR.Layers == nil || slices.Contains(j.EXR.Layers, frame.EXRDoppler))
	var l linearFrame
	var err error
	l.ex, err = PlanExposure(j.Plan, fs.Index, fr.Shutter, fr.FWHM, j.Projection)
	if err != nil {
		return linearFrame{ex: l.ex}, err
	}
	l.lay = j.FrameLayers(fs, obs)
	if l.ex.Knots == nil {
		if dst == nil {
			l.f, err = prep.Render(opt)
		} else {
			l.f, err = dst, prep.RenderInto(dst, opt)
		}
		if err != nil {
			return linearFrame{ex: l.ex}, err
		}
		switch {
		case keep:
			l.kept, err = l.lay.AddLinearKept(l.f)
		case pend:
			l.pending, err = l.lay.AddLinearPending(l.f)
		default:
			err = l.lay.AddLinear(l.f)
		}
		return l, err
	}
	knots, err := Instants(j.Plan, fs.Index, l.ex.Knots, j.Projection)
	if err != nil {
		return linearFrame{ex: l.ex}, err
	}
	if dst == nil {
		l.f, err = prep.RenderMotion(opt, knots)
	} else {
		l.f, err = dst, prep.RenderMotionInto(dst, opt, knots)
	}
	if err != nil {
		return linearFrame{ex: l.ex}, err
	}
	at, err := Instants(j.Plan, fs.Index, l.ex.Layers, j.Projection)
	if err != nil {
		return linearFrame{ex: l.ex}, err
	}
	if keep {
		l.kept, err = l.lay.AddLinearMotionKept(l.f, at, l.ex.LayerWeights)
	} else {
		err = l.lay.AddLinearMotion(l.f, at, l.ex.LayerWeights)
	}
	return l, err
}

// frameEXR encodes a flight frame's OpenEXR file: the frame, its kept
// linear contributions, the overlays alone (the overlay layer when the plan
// writes one, else drawn on a transparent image) and the physical state,
// at the plan's frame rate.
func (j *Job) frameEXR(spec *frame.Spec, f *render.Frame, kept []render.Contribution, side render.Sidecar, layer *image.NRGBA) ([]byte, error) {
	img, err := spec.EXRFile(f, kept, side, layer)
	if err != nil {
		return nil, fmt.Errorf("camera.exr_layers: %w", err)
	}
	enc := exr.Encoder{Compression: j.EXR.Compression, Workers: j.Workers}
	var buf bytes.Buffer
	if err := enc.Encode(&buf, img); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// frameSky settles the catalogue of frame i (state fs, observer obs,
// projection proj): with Sky, the frame's catalogue and its prepared form
// for the depth the frame needs at its own instant and at the shutter's
// opening and closing, and its completeness report; without, Stars and
// prep as given. The job it returns is j with the unresolved layer
// starting at that depth when UnresolvedFollows.
func (j *Job) frameSky(prep *render.Prepared, i int, fs flight.FrameState, obs camera.Observer, proj camera.Projection) (*Job, *catalog.Stars, *render.Prepared, *sky.Report, error) {
	if j.Sky == nil {
		return j, j.Stars, prep, nil, nil
	}
	opts := []render.Options{j.instantOptions(fs, obs, proj)}
	if sh := j.Frame.Shutter; sh > 0 {
		for _, u := range []float64{-1, 1} {
			fsk, err := j.Plan.FrameStateAt(i, flight.ExposureOffset(u, sh))
			if err != nil {
				return nil, nil, nil, nil, err
			}
			obsk, err := flight.Observer(fsk.State)
			if err != nil {
				return nil, nil, nil, nil, err
			}
			projk, err := j.Projection(fsk)
			if err != nil {
				return nil, nil, nil, nil, err
			}
			opts = append(opts, j.instantOptions(fsk, obsk, projk))
		}
	}
	fsky, err := j.Sky.Frame(opts, math.NaN())
	if err != nil {
		return nil, nil, nil, nil, err
	}
	stars, fprep, err := fsky.Stars(obs.Position)
	if err != nil {
		return nil, nil, nil, nil, err
	}
	jf := j
	if j.UnresolvedFollows && j.Unresolved != nil && j.Layers.Unresolved != nil {
		u, err := j.Unresolved.At(fsky.Depth)
		if err != nil {
			return nil, nil, nil, nil, err
		}
		c := *j
		c.Layers.Unresolved, c.Layers.UnresolvedDepth = u, fsky.Depth
		jf = &c
	}
	rep := fsky.Report
	return jf, stars, fprep, &rep, nil
}

// instantOptions are the render options of one instant of a frame: the
// ones RenderLinear draws it with.
func (j *Job) instantOptions(fs flight.FrameState, obs camera.Observer, proj camera.Projection) render.Options {
	fr := j.Frame
	return render.Options{Projection: proj, Observer: obs, Beaming: fr.Beaming, FWHM: fr.FWHM,
		Exposure: fs.Camera.Exposure, Limit: fr.Limit, Color: spectrum.ColorOptions{White: fr.White}, Workers: j.Workers,
		ExtendedScale: j.ExtendedScale}
}

// finitePtr returns &v, or nil for NaN and ±Inf.
func finitePtr(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}
