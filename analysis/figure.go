package analysis

import (
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Text sizes of every figure: ≥ 10 pt so that a 6 × 4 in figure stays
// readable at 100 dpi.
const (
	TextSize    = vg.Length(10)
	CaptionSize = vg.Length(11)
)

// Size is the size of a written figure. The zero value means the figure's
// default size (DefaultSize) at DefaultDPI.
type Size struct {
	Width, Height vg.Length // zero: Figure.DefaultSize
	DPI           int       // PNG only; zero: DefaultDPI
}

// DefaultDPI is the PNG resolution when Size.DPI is zero.
const DefaultDPI = 150

// Figure is one or more plot panels laid out in a grid under a caption.
type Figure struct {
	// Name is a short file-name stem ("aberration").
	Name string
	// Caption is drawn above the panels (one or more lines); it states the
	// physics parameters of the figure.
	Caption string
	// Panels in row-major order; Cols per row (zero: 1 panel per row when
	// there are fewer than 3 panels in a single-panel figure, else 2).
	Panels []*plot.Plot
	Cols   int
}

func (f *Figure) grid() (rows, cols int) {
	cols = f.Cols
	if cols <= 0 {
		cols = 1
		if len(f.Panels) > 1 {
			cols = 2
		}
	}
	cols = min(cols, max(len(f.Panels), 1))
	rows = (len(f.Panels) + cols - 1) / cols
	return rows, cols
}

// DefaultSize is 6 × 4 in for one panel and 5 × 3.4 in per panel for a grid,
// plus the caption.
func (f *Figure) DefaultSize() (w, h vg.Length) {
	rows, cols := f.grid()
	if rows*cols <= 1 {
		return 6 * vg.Inch, 4 * vg.Inch
	}
	return vg.Length(cols) * 5 * vg.Inch, vg.Length(rows)*3.4*vg.Inch + f.captionHeight()
}

func captionStyle() text.Style {
	return text.Style{
		Color:   color.Black,
		Font:    font.From(plot.DefaultFont, CaptionSize),
		XAlign:  draw.XCenter,
		YAlign:  draw.YTop,
		Handler: plot.DefaultTextHandler,
	}
}

func (f *Figure) captionHeight() vg.Length {
	if f.Caption == "" {
		return 0
	}
	return captionStyle().Height(f.Caption) + 8
}

func (f *Figure) check() error {
	if len(f.Panels) == 0 {
		return fmt.Errorf("analysis: figure %q has no panels", f.Name)
	}
	return nil
}

func (f *Figure) size(s Size) (w, h vg.Length, dpi int, err error) {
	w, h = s.Width, s.Height
	if w == 0 || h == 0 {
		dw, dh := f.DefaultSize()
		if w == 0 {
			w = dw
		}
		if h == 0 {
			h = dh
		}
	}
	dpi = s.DPI
	if dpi == 0 {
		dpi = DefaultDPI
	}
	if !(w > 0) || !(h > 0) || math.IsInf(float64(w), 0) || math.IsInf(float64(h), 0) || w > 100*vg.Inch || h > 100*vg.Inch {
		return 0, 0, 0, fmt.Errorf("analysis: figure size %v × %v out of range", w, h)
	}
	if dpi < 10 || dpi > 1200 {
		return 0, 0, 0, fmt.Errorf("analysis: figure resolution %d dpi out of range 10..1200", dpi)
	}
	if float64(w)/vg.Inch.Points()*float64(dpi) > 16384 || float64(h)/vg.Inch.Points()*float64(dpi) > 16384 {
		return 0, 0, 0, fmt.Errorf("analysis: figure of %v × %v at %d dpi is too many pixels", w, h, dpi)
	}
	return w, h, dpi, nil
}

// Draw draws the figure on a canvas.
func (f *Figure) Draw(dc draw.Canvas) {
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	if f.Caption != "" {
		sty := captionStyle()
		pt := vg.Point{X: (dc.Min.X + dc.Max.X) / 2, Y: dc.Max.Y - 4}
		dc.FillText(sty, pt, f.Caption)
		dc = draw.Crop(dc, 0, 0, 0, -f.captionHeight())
	}
	rows, cols := f.grid()
	grid := make([][]*plot.Plot, rows)
	for j := range grid {
		grid[j] = make([]*plot.Plot, cols)
		for i := range grid[j] {
			if k := j*cols + i; k < len(f.Panels) {
				grid[j][i] = f.Panels[k]
			}
		}
	}
	tiles := draw.Tiles{Rows: rows, Cols: cols, PadX: 6, PadY: 6, PadTop: 2, PadBottom: 2, PadLeft: 2, PadRight: 6}
	cv := plot.Align(grid, tiles, dc)
	for j := range grid {
		for i, p := range grid[j] {
			if p != nil {
				p.Draw(cv[j][i])
			}
		}
	}
}

// WritePNG renders the figure to PNG.
func (f *Figure) WritePNG(w io.Writer, s Size) error {
	if err := f.check(); err != nil {
		return err
	}
	wd, ht, dpi, err := f.size(s)
	if err != nil {
		return err
	}
	c := vgimg.NewWith(vgimg.UseWH(wd, ht), vgimg.UseDPI(dpi))
	f.Draw(draw.New(c))
	_, err = vgimg.PngCanvas{Canvas: c}.WriteTo(w)
	return err
}

// WriteSVG renders the figure to SVG (Size.DPI is ignored).
func (f *Figure) WriteSVG(w io.Writer, s Size) error {
	if err := f.check(); err != nil {
		return err
	}
	wd, ht, _, err := f.size(s)
	if err != nil {
		return err
	}
	c := vgsvg.New(wd, ht)
	f.Draw(draw.New(c))
	_, err = c.WriteTo(w)
	return err
}
