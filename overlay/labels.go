package overlay

import (
	"errors"
	"fmt"
	"math"
	"sync"

	"git.sr.ht/~sbinet/gg"
	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gomono"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
)

// ErrLabel reports a label that names no star, or bad label options.
var ErrLabel = errors.New("overlay: label")

// LabelOptions choose which stars get a name label. The zero value labels
// none.
type LabelOptions struct {
	// Brightest labels the N brightest drawn stars, taken from
	// Frame.Stats.Brightest: render with Options.Brightest ≥ N to have
	// that many listed.
	Brightest int
	// Stars are catalogue ids or names (anything Find accepts), labelled
	// at their apparent positions.
	Stars []string
	// Find resolves Stars to catalogue rows; nil means catalog.Stars.Find.
	// The names package's Index.Find also reads proper names and
	// designations.
	Find func(query string) (int, error)
	// Text gives a star's label from its catalogue id and name; nil means
	// the name, else catalog.DisplayID. The names package's
	// Index.LabelByID writes readable labels (proper name, α Ori, …).
	Text func(id int64, name string) string
}

// text is the label of a star under o.
func (o LabelOptions) text(id int64, name string) string {
	if o.Text != nil {
		return o.Text(id, name)
	}
	return starText(name, id)
}

// ResolveLabels returns the catalogue rows of ids, in order, or an error
// wrapping ErrLabel naming the first id that matches no star.
func ResolveLabels(stars *catalog.Stars, ids []string) ([]int, error) {
	if len(ids) == 0 {
		return nil, nil
	}
	if stars == nil {
		return nil, fmt.Errorf("%w: %q: no star list to look it up in", ErrLabel, ids[0])
	}
	rows := make([]int, len(ids))
	for k, id := range ids {
		i, ok := stars.Find(id)
		if !ok {
			return nil, fmt.Errorf("%w: %q: no such star in %s", ErrLabel, id, stars.Source)
		}
		rows[k] = i
	}
	return rows, nil
}

// box is an axis-aligned rectangle in pixel coordinates.
type box struct{ x0, y0, x1, y1 float64 }

func (a box) overlaps(b box) bool { return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1 }

// labelTarget is a star to label: its text and pixel position.
type labelTarget struct {
	text string
	x, y float64
}

// PlacedLabel is a label that found room.
type PlacedLabel struct {
	Text string
	// StarX, StarY are the star's pixel coordinates.
	StarX, StarY float64
	// X0, Y0, X1, Y1 bound the text box.
	X0, Y0, X1, Y1 float64
}

// placeLabels places each target's label greedily, in order, at the first
// of eight positions around the star (right, upper right, lower right,
// left, upper left, lower left, above, below; gap pixels from it) whose box
// passes room (inside the image, or a fisheye's circle) and overlaps no
// placed label, no blocked box and no labelled star's own dot. A label
// with no room is skipped.
func placeLabels(targets []labelTarget, measure func(string) (float64, float64), room func(b box, sx, sy float64) bool, blocked []box, gap float64) []PlacedLabel {
	occupied := append([]box(nil), blocked...)
	for _, t := range targets {
		occupied = append(occupied, box{t.x - gap/2, t.y - gap/2, t.x + gap/2, t.y + gap/2})
	}
	var out []PlacedLabel
	for _, t := range targets {
		tw, th := measure(t.text)
		cands := [8][2]float64{
			{t.x + gap, t.y - th/2}, {t.x + gap, t.y - gap - th}, {t.x + gap, t.y + gap},
			{t.x - gap - tw, t.y - th/2}, {t.x - gap - tw, t.y - gap - th}, {t.x - gap - tw, t.y + gap},
			{t.x - tw/2, t.y - gap - th}, {t.x - tw/2, t.y + gap},
		}
		for _, c := range cands {
			b := box{c[0], c[1], c[0] + tw, c[1] + th}
			if !room(b, t.x, t.y) {
				continue
			}
			free := true
			for _, o := range occupied {
				if b.overlaps(o) {
					free = false
					break
				}
			}
			if !free {
				continue
			}
			occupied = append(occupied, b)
			out = append(out, PlacedLabel{Text: t.text, StarX: t.x, StarY: t.y, X0: b.x0, Y0: b.y0, X1: b.x1, Y1: b.y1})
			break
		}
	}
	return out
}

// starText is the label of a star: its name, else its catalogue
// designation (catalog.DisplayID).
func starText(name string, id int64) string {
	if name != "" {
		return name
	}
	return catalog.DisplayID(id)
}

// labelTargets collects the stars to label: the brightest listed in the
// frame's stats, then the named stars (seen through the frame's observer
// and projection), each row once, those off the image left out.
func labelTargets(f *render.Frame, stars *catalog.Stars, opt LabelOptions) ([]labelTarget, error) {
	if opt.Brightest < 0 {
		return nil, fmt.Errorf("%w: Brightest %d, want ≥ 0", ErrLabel, opt.Brightest)
	}
	var rows []int
	if opt.Find == nil {
		var err error
		if rows, err = ResolveLabels(stars, opt.Stars); err != nil {
			return nil, err
		}
	} else {
		for _, q := range opt.Stars {
			i, err := opt.Find(q)
			if err != nil {
				return nil, fmt.Errorf("%w: %w", ErrLabel, err)
			}
			if stars == nil || i < 0 || i >= stars.Len() {
				return nil, fmt.Errorf("%w: %q: row %d out of range", ErrLabel, q, i)
			}
			rows = append(rows, i)
		}
	}
	// Keyed by catalogue id: the named stars may come from a catalogue
	// holding only them (a streamed render), whose rows are not the
	// frame's rows.
	seen := map[int64]bool{}
	var out []labelTarget
	w, h := float64(f.W), float64(f.H)
	inside := func(x, y float64) bool { return x >= 0 && x <= w && y >= 0 && y <= h }
	for k, s := range f.Stats.Brightest {
		if k >= opt.Brightest {
			break
		}
		if seen[s.ID] || !inside(s.X, s.Y) {
			continue
		}
		seen[s.ID] = true
		out = append(out, labelTarget{opt.text(s.ID, s.Name), s.X, s.Y})
	}
	if len(rows) == 0 {
		return out, nil
	}
	p := f.Options.Projection
	if err := p.Prepare(); err != nil {
		return nil, err
	}
	for _, i := range rows {
		if seen[stars.ID[i]] {
			continue
		}
		seen[stars.ID[i]] = true
		st := stars.At(i)
		n, _, _, r := f.Options.Observer.See(r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}, st.Dist)
		if r == 0 {
			continue
		}
		x, y, ok := projectVisible(&p, n)
		if !ok || !inside(x, y) || math.IsNaN(x) {
			continue
		}
		out = append(out, labelTarget{opt.text(st.ID, st.Name), x, y})
	}
	return out, nil
}

// Fonts: the Go fonts (golang.org/x/image/font/gofont), parsed once; never
// system fonts, so output is the same on every machine.
var (
	fontOnce          sync.Once
	fontSans, fontMon *opentype.Font
	fontErr           error
)

func loadFonts() error {
	fontOnce.Do(func() {
		if fontSans, fontErr = opentype.Parse(goregular.TTF); fontErr != nil {
			return
		}
		fontMon, fontErr = opentype.Parse(gomono.TTF)
	})
	if fontErr != nil {
		return fmt.Errorf("overlay: font: %w", fontErr)
	}
	return nil
}

// newFace returns a face of f at size pixels (72 dpi, unhinted so layout
// scales smoothly). Faces are not safe for concurrent use: one per call.
func newFace(f *opentype.Font, size float64) (font.Face, error) {
	if !(size > 0) || math.IsInf(size, 0) {
		return nil, fmt.Errorf("%w: text size %g px, want a finite size > 0", ErrOverlay, size)
	}
	face, err := opentype.NewFace(f, &opentype.FaceOptions{Size: size, DPI: 72, Hinting: font.HintingNone})
	if err != nil {
		return nil, fmt.Errorf("overlay: font: %w", err)
	}
	return face, nil
}

// drawLabels draws placed labels: a short leader tick toward the star and
// the text in pale grey in a dark halo. scale converts overlay points to
// pixels for this text size.
func drawLabels(dc *gg.Context, labels []PlacedLabel, face font.Face, scale float64) {
	dc.SetFontFace(face)
	asc := float64(face.Metrics().Ascent.Round())
	for _, l := range labels {
		bx, by := math.Max(l.X0, math.Min(l.StarX, l.X1)), math.Max(l.Y0, math.Min(l.StarY, l.Y1))
		dc.SetRGBA(0.8, 0.8, 0.85, 0.5)
		dc.SetLineWidth(0.8 * scale)
		mx, my := l.StarX+(bx-l.StarX)*0.35, l.StarY+(by-l.StarY)*0.35
		dc.MoveTo(mx, my)
		dc.LineTo(l.StarX+(bx-l.StarX)*0.8, l.StarY+(by-l.StarY)*0.8)
		dc.Stroke()
		drawHalo(dc, l.Text, l.X0, l.Y0+asc, scale)
		dc.SetRGBA(0.88, 0.90, 0.94, 0.95)
		dc.DrawString(l.Text, l.X0, l.Y0+asc)
	}
}

// drawHalo draws s in translucent black at eight points on a circle of
// 1.2 overlay points around (x, y), a dark halo that keeps the text drawn
// there next readable over bright stars and lines.
func drawHalo(dc *gg.Context, s string, x, y, scale float64) {
	r := math.Max(1, 1.2*scale)
	dc.SetRGBA(0, 0, 0, 0.45)
	for k := 0; k < 8; k++ {
		sn, cs := math.Sincos(float64(k) * math.Pi / 4)
		dc.DrawString(s, x+r*cs, y+r*sn)
	}
}
