package catalog

import (
	"bytes"
	"fmt"
	"math"
)

// Field numbers (H0…H77) of hip_main.dat used by readHipparcos, from the
// byte-by-byte description of CDS I/239 (ESA 1997). Fields are separated by
// '|', so field Hn is the n-th separated item.
const (
	hipH0     = 0  // catalogue letter, "H"
	hipHIP    = 1  // HIP number (bytes 9–14)
	hipRAhms  = 3  // RA "hh mm ss.ss" (bytes 18–28), J2000 equinox
	hipDEdms  = 4  // Dec "±dd mm ss.s" (bytes 30–40)
	hipVmag   = 5  // Johnson V (bytes 42–46)
	hipRAdeg  = 8  // α, degrees, ICRS, epoch J1991.25 (bytes 52–63)
	hipDEdeg  = 9  // δ, degrees (bytes 65–76)
	hipPlx    = 11 // trigonometric parallax, mas (bytes 80–86)
	hipPMRA   = 12 // μα·cos δ, mas/yr (bytes 88–95)
	hipPMDE   = 13 // μδ, mas/yr (bytes 97–104)
	hipBV     = 37 // Johnson B−V (bytes 246–251)
	hipFields = 38 // a line needs at least H0…H37
)

// readHipparcos reads the Hipparcos Catalogue main file (CDS I/239,
// hip_main.dat). Positions are ICRS at epoch J1991.25. Where H8/H9 are
// blank (entries without an astrometric solution) the sexagesimal H3/H4
// are used instead; a row with neither, or without V, is skipped. Distance
// is 1000/Plx for a positive parallax; zero or negative parallaxes give
// +Inf and FlagNoDistance.
func readHipparcos(lr *lineReader, b *builder) error {
	fields := make([][]byte, 0, 80)
	return lr.eachLine(func(line []byte, n int) error {
		fields = splitPlain(line, '|', fields[:0], hipFields+1)
		if len(fields) < hipFields {
			return &ParseError{File: b.file, Line: n, Err: fmt.Errorf("%w: %d '|'-separated fields, want at least %d", ErrFieldCount, len(fields), hipFields)}
		}
		if h0 := bytes.TrimSpace(fields[hipH0]); string(h0) != "H" {
			return &ParseError{File: b.file, Line: n, Field: "H0", Value: shortValue(h0), Err: fmt.Errorf("%w: want \"H\"", ErrUnknownFormat)}
		}
		id, err := b.integer(fields[hipHIP], "HIP", n)
		if err != nil {
			return err
		}
		ra, okRA, err := b.ranged(fields[hipRAdeg], "RAdeg", n, 0, 360)
		if err != nil {
			return err
		}
		dec, okDE, err := b.ranged(fields[hipDEdeg], "DEdeg", n, -90, 90)
		if err != nil {
			return err
		}
		if !okRA || !okDE {
			ra, okRA, err = b.sexagesimal(fields[hipRAhms], "RAhms", n, 15, false)
			if err != nil {
				return err
			}
			dec, okDE, err = b.sexagesimal(fields[hipDEdms], "DEdms", n, 1, true)
			if err != nil {
				return err
			}
			if !okRA || !okDE {
				b.skip("no position", n)
				return nil
			}
		}
		v, ok, err := b.ranged(fields[hipVmag], "Vmag", n, vmagLo, vmagHi)
		if err != nil {
			return err
		}
		if !ok {
			b.skip("no V magnitude", n)
			return nil
		}
		plx, okPlx, err := b.ranged(fields[hipPlx], "Plx", n, -1e5, 1e5)
		if err != nil {
			return err
		}
		pmra, _, err := b.ranged(fields[hipPMRA], "pmRA", n, -pmLim, pmLim)
		if err != nil {
			return err
		}
		pmde, _, err := b.ranged(fields[hipPMDE], "pmDE", n, -pmLim, pmLim)
		if err != nil {
			return err
		}
		bv, _, err := b.ranged(fields[hipBV], "B-V", n, bvLo, bvHi)
		if err != nil {
			return err
		}
		st := Star{ID: id, RA: ra, Dec: dec, Vmag: v, BV: bv, RV: math.NaN()}
		if !math.IsNaN(pmra) && !math.IsNaN(pmde) {
			st.PMRA, st.PMDec = pmra, pmde
		}
		var fd, fc Flag
		st.Dist, fd = distFromParallax(plx, okPlx)
		st.Teff, fc = starColour(math.NaN(), bv, math.NaN())
		st.Flags = fd | fc
		if err := b.add(st, n); err != nil {
			return err
		}
		return nil
	})
}

// sexagesimal parses "hh mm ss.s" or "±dd mm ss.s" (blank → ok=false) and
// returns scale·(a + b/60 + c/3600) in degrees.
func (b *builder) sexagesimal(raw []byte, field string, line int, scale float64, signed bool) (float64, bool, error) {
	t := bytes.TrimSpace(raw)
	if len(t) == 0 {
		return math.NaN(), false, nil
	}
	neg := false
	if signed && (t[0] == '+' || t[0] == '-') {
		neg = t[0] == '-'
		t = t[1:]
	}
	parts := bytes.Fields(t)
	if len(parts) != 3 {
		return 0, false, &ParseError{File: b.file, Line: line, Field: field, Value: shortValue(raw), Err: fmt.Errorf("%w: want three numbers", ErrNotNumber)}
	}
	var v [3]float64
	lim := [3]float64{24, 60, 60}
	if signed {
		lim[0] = 90
	}
	for i, p := range parts {
		x, _, err := b.ranged(p, field, line, 0, lim[i])
		if err != nil {
			return 0, false, err
		}
		v[i] = x
	}
	d := scale * (v[0] + v[1]/60 + v[2]/3600)
	if neg {
		d = -d
	}
	if (signed && math.Abs(d) > 90) || (!signed && d >= 360) {
		return 0, false, &ParseError{File: b.file, Line: line, Field: field, Value: shortValue(raw), Err: ErrOutOfRange}
	}
	return d, true, nil
}

// splitPlain splits line at sep into at most max fields (the last holding
// the rest), reusing out.
func splitPlain(line []byte, sep byte, out [][]byte, max int) [][]byte {
	for len(out) < max-1 {
		i := bytes.IndexByte(line, sep)
		if i < 0 {
			break
		}
		out = append(out, line[:i])
		line = line[i+1:]
	}
	return append(out, line)
}

// readHip2 reads Hipparcos, the New Reduction (van Leeuwen 2007; CDS I/311,
// hip2.dat) by the byte columns of its ReadMe (1-based, inclusive):
//
//	1–6 HIP, 16–28 RArad, 30–42 DErad (radians, ICRS, epoch J1991.25),
//	44–50 Plx (mas), 52–59 pmRA, 61–68 pmDE (mas/yr), 130–136 Hpmag,
//	153–158 B−V, 166–171 V−I.
//
// The file has no V: V is computed from Hp and B−V with VFromHp (Bessell
// 2000 table). Rows without a position or Hp are skipped and counted.
func readHip2(lr *lineReader, b *builder) error {
	return lr.eachLine(func(line []byte, n int) error {
		id, err := b.integer(col(line, 1, 6), "HIP", n)
		if err != nil {
			return err
		}
		ra, okRA, err := b.ranged(col(line, 16, 28), "RArad", n, 0, 2*math.Pi+1e-9)
		if err != nil {
			return err
		}
		dec, okDE, err := b.ranged(col(line, 30, 42), "DErad", n, -math.Pi/2-1e-9, math.Pi/2+1e-9)
		if err != nil {
			return err
		}
		if !okRA || !okDE {
			b.skip("no position", n)
			return nil
		}
		hp, ok, err := b.ranged(col(line, 130, 136), "Hpmag", n, vmagLo, vmagHi)
		if err != nil {
			return err
		}
		if !ok {
			b.skip("no Hp magnitude", n)
			return nil
		}
		plx, okPlx, err := b.ranged(col(line, 44, 50), "Plx", n, -1e5, 1e5)
		if err != nil {
			return err
		}
		pmra, _, err := b.ranged(col(line, 52, 59), "pmRA", n, -pmLim, pmLim)
		if err != nil {
			return err
		}
		pmde, _, err := b.ranged(col(line, 61, 68), "pmDE", n, -pmLim, pmLim)
		if err != nil {
			return err
		}
		bv, _, err := b.ranged(col(line, 153, 158), "B-V", n, bvLo, bvHi)
		if err != nil {
			return err
		}
		if _, _, err := b.ranged(col(line, 166, 171), "V-I", n, bvLo, bvHi); err != nil {
			return err
		}
		st := Star{ID: id, RA: ra / degToRad, Dec: math.Max(-90, math.Min(90, dec/degToRad)), BV: bv, RV: math.NaN()}
		if st.RA >= 360 {
			st.RA -= 360
		}
		st.Vmag = VFromHp(hp, bv)
		if !math.IsNaN(pmra) && !math.IsNaN(pmde) {
			st.PMRA, st.PMDec = pmra, pmde
		}
		var fd, fc Flag
		st.Dist, fd = distFromParallax(plx, okPlx)
		st.Teff, fc = starColour(math.NaN(), bv, math.NaN())
		st.Flags = fd | fc
		if err := b.add(st, n); err != nil {
			return err
		}
		return nil
	})
}
