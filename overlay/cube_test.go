package overlay

import (
	"image"
	"testing"

	"git.sr.ht/~sbinet/gg"

	"github.com/skyframe/skyframe/camera"
)

// litColumns returns, per x, whether any pixel of that column is lit.
func litColumns(img *image.RGBA) []bool {
	b := img.Bounds()
	out := make([]bool, b.Dx())
	for y := 0; y < b.Dy(); y++ {
		for x := 0; x < b.Dx(); x++ {
			if img.RGBAAt(x, y).A > 0 {
				out[x] = true
			}
		}
	}
	return out
}

// In a cube strip, sky overlays stay on their own face (the strip's faces
// are not neighbours on the sky, so a stroke crossing an edge would draw
// on an unrelated part of it): a thick line ending on a face edge and
// markers beside it light nothing on the next face, while the same drawing
// unclipped does; label boxes stay on their star's face.
func TestCubeOverlaysStayOnTheirFace(t *testing.T) {
	p := looking(t, camera.Cube, 6*64, 64, 0, axisX)
	line := Polyline{Kind: Parallel, Points: []Vertex{{X: 20, Y: 30}, {X: 40, Y: 30}, {X: 64, Y: 30}}}
	edge := Polyline{Kind: Meridian, Points: []Vertex{{X: 128, Y: 10}, {X: 110, Y: 30}, {X: 128, Y: 50}}} // ends on an edge
	s := sky{lines: []Polyline{line, edge}, frame: GraticuleEquatorial, unity: []Polyline{line},
		marks: []mark{{x: 190, y: 30, motion: true}, {x: 252, y: 20}}, beacons: []Beacon{{X: 318, Y: 40, D: 1, Dist: 1}}}
	clipped := image.NewRGBA(image.Rect(0, 0, 6*64, 64))
	drawSky(gg.NewContextForRGBA(clipped), p, s, 3)
	cols := litColumns(clipped)
	for _, c := range []struct{ lo, hi int }{{64, 70}, {128, 134}, {192, 198}, {256, 262}, {320, 326}} {
		for x := c.lo; x < c.hi; x++ {
			if cols[x] {
				t.Errorf("column %d, on the face after the edge at %d, is lit", x, c.lo)
			}
		}
	}
	for _, x := range []int{60, 124, 186, 250, 315} {
		if !cols[x] {
			t.Errorf("column %d, on the drawing's own face, is dark", x)
		}
	}
	flat := p
	flat.Kind = camera.Pinhole
	unclipped := image.NewRGBA(image.Rect(0, 0, 6*64, 64))
	drawSky(gg.NewContextForRGBA(unclipped), flat, s, 3)
	if !litColumns(unclipped)[64] {
		t.Error("the unclipped drawing does not cross the edge: the test shows nothing")
	}

	room := labelRoom(p, 1)
	if room(box{100, 10, 140, 20}, 110, 15) || !room(box{70, 10, 120, 20}, 110, 15) || room(box{70, 10, 120, 20}, 60, 15) {
		t.Error("cube label room: boxes across an edge or off the star's face accepted, or a box on it refused")
	}
}
