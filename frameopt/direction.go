package frameopt

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// DirKind is how a direction is given.
type DirKind int

// Direction spellings.
const (
	Ahead     DirKind = iota // "ahead": the direction of motion
	Behind                   // "behind": opposite to the motion
	Apparent                 // "RA,DEC": as seen from the ship
	Catalogue                // "catalogue:RA,DEC": in the catalogue (rest) frame
	Star                     // a star id or name, where it appears
)

// DirSet is a set of DirKind.
type DirSet uint8

// Has reports whether k is in s.
func (s DirSet) Has(k DirKind) bool { return s&(1<<k) != 0 }

// Common direction sets.
const (
	AnyDir   DirSet = 1<<Ahead | 1<<Behind | 1<<Apparent | 1<<Catalogue | 1<<Star
	SkyDir   DirSet = 1<<Apparent | 1<<Catalogue           // up
	PointDir DirSet = 1<<Apparent | 1<<Catalogue | 1<<Star // toward, mark-destination
)

// CataloguePrefix starts a catalogue-frame direction: "catalogue:RA,DEC".
const CataloguePrefix = "catalogue:"

// Spellings describes the spellings of s for help texts.
func (s DirSet) Spellings() string {
	var parts []string
	if s.Has(Ahead) {
		parts = append(parts, "ahead")
	}
	if s.Has(Behind) {
		parts = append(parts, "behind")
	}
	if s.Has(Apparent) {
		parts = append(parts, "RA,DEC (apparent, as seen from the ship; degrees)")
	}
	if s.Has(Catalogue) {
		parts = append(parts, "catalogue:RA,DEC (catalogue frame)")
	}
	if s.Has(Star) {
		parts = append(parts, "a star id or name (where it appears)")
	}
	return strings.Join(parts, ", ")
}

// Direction is a parsed direction.
type Direction struct {
	Kind    DirKind
	RA, Dec float64 // degrees, RA in [0, 360), for Apparent and Catalogue
	Star    string  // for Star
	Text    string  // as given
}

// ErrDirection is wrapped by direction errors.
var ErrDirection = errors.New("frameopt: bad direction")

// ParseDirection reads a direction in one of the spellings of allow. Two
// comma-separated numbers are always read as RA,DEC (an out-of-range
// declination is an error, never a star name).
func ParseDirection(s string, allow DirSet) (Direction, error) {
	t := strings.TrimSpace(s)
	d := Direction{Text: s}
	switch strings.ToLower(t) {
	case "ahead":
		d.Kind = Ahead
	case "behind":
		d.Kind = Behind
	default:
		d.Kind = Apparent
		if rest, ok := cutPrefixFold(t, CataloguePrefix); ok {
			d.Kind, t = Catalogue, rest
		}
		ra, dec, isNum, err := parseRADec(t)
		switch {
		case err != nil:
			return d, err
		case isNum:
			d.RA, d.Dec = ra, dec
		case d.Kind == Catalogue:
			return d, fmt.Errorf("%w: %q: want catalogue:RA,DEC in degrees", ErrDirection, s)
		case t == "":
			return d, fmt.Errorf("%w: empty", ErrDirection)
		default:
			d.Kind, d.Star = Star, t
		}
	}
	if !allow.Has(d.Kind) {
		return d, fmt.Errorf("%w: %q: want %s", ErrDirection, s, allow.Spellings())
	}
	return d, nil
}

func cutPrefixFold(s, prefix string) (string, bool) {
	if len(s) >= len(prefix) && strings.EqualFold(s[:len(prefix)], prefix) {
		return strings.TrimSpace(s[len(prefix):]), true
	}
	return s, false
}

// parseRADec reads "RA,DEC" in degrees; isNum is false when s is not two
// numbers (it may be a star name).
func parseRADec(s string) (ra, dec float64, isNum bool, err error) {
	a, b, ok := strings.Cut(s, ",")
	if !ok || strings.Contains(b, ",") {
		return 0, 0, false, nil
	}
	ra, e1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
	dec, e2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
	if e1 != nil || e2 != nil {
		return 0, 0, false, nil
	}
	if math.IsNaN(ra) || math.IsInf(ra, 0) || math.IsNaN(dec) || math.IsInf(dec, 0) {
		return 0, 0, true, fmt.Errorf("%w: %q: want finite degrees", ErrDirection, s)
	}
	if dec < -90 || dec > 90 {
		return 0, 0, true, fmt.Errorf("%w: %q: declination %g is outside [-90, 90]", ErrDirection, s, dec)
	}
	return math.Mod(math.Mod(ra, 360)+360, 360), dec, true, nil
}

// StarFinder looks a star up by id or name: its unit direction from the Sun
// (catalogue frame, ICRS) and distance in parsecs (+Inf when unknown).
type StarFinder func(name string) (dir r3.Vec, distPc float64, ok bool)

// ErrUnknownStar is wrapped when a star is not found.
var ErrUnknownStar = errors.New("frameopt: unknown star")

// ErrAtStar is wrapped when the ship is at the star it should look at.
var ErrAtStar = errors.New("frameopt: the ship is at that star")

// Resolve returns the unit direction d points to as seen from the ship
// (apparent, ship frame, ICRS axes) for observer obs moving along the unit
// vector heading (aberration leaves the axis of motion fixed, so ahead and
// behind are the same in both frames); a star is where its light appears from obs's
// position and velocity.
func (d Direction) Resolve(obs camera.Observer, heading r3.Vec, find StarFinder) (r3.Vec, error) {
	switch d.Kind {
	case Ahead:
		return heading, nil
	case Behind:
		return r3.Scale(-1, heading), nil
	case Apparent:
		return camera.FromRADec(d.RA, d.Dec), nil
	case Catalogue:
		n, _ := obs.Boost.Apply(camera.FromRADec(d.RA, d.Dec))
		return n, nil
	}
	if find == nil {
		return r3.Vec{}, fmt.Errorf("%w %q", ErrUnknownStar, d.Star)
	}
	u, dist, ok := find(d.Star)
	if !ok {
		return r3.Vec{}, fmt.Errorf("%w %q", ErrUnknownStar, d.Star)
	}
	n, _, _, r := obs.See(u, dist)
	if r == 0 {
		return r3.Vec{}, fmt.Errorf("%w %q", ErrAtStar, d.Star)
	}
	return n, nil
}

// CatalogueDir returns the catalogue-frame unit direction from the ship
// toward d: the inverse aberration of an apparent direction, the direction
// itself for catalogue:RA,DEC, the line from the ship to a star.
func (d Direction) CatalogueDir(obs camera.Observer, heading r3.Vec, find StarFinder) (r3.Vec, error) {
	switch d.Kind {
	case Catalogue:
		return camera.FromRADec(d.RA, d.Dec), nil
	case Star:
		if find == nil {
			return r3.Vec{}, fmt.Errorf("%w %q", ErrUnknownStar, d.Star)
		}
		u, dist, ok := find(d.Star)
		if !ok {
			return r3.Vec{}, fmt.Errorf("%w %q", ErrUnknownStar, d.Star)
		}
		if math.IsInf(dist, 0) {
			return u, nil
		}
		v := r3.Sub(r3.Scale(dist, u), obs.Position)
		if r3.Norm(v) == 0 {
			return r3.Vec{}, fmt.Errorf("%w %q", ErrAtStar, d.Star)
		}
		return r3.Unit(v), nil
	}
	n, err := d.Resolve(obs, heading, find)
	if err != nil {
		return n, err
	}
	m, _ := obs.Boost.Inverse().Apply(n)
	return m, nil
}
