package catalog

import (
	"bytes"
	"fmt"
	"math"
)

// readBSC5 reads the Bright Star Catalogue, 5th Revised Ed. (Hoffleit &
// Warren 1991; CDS V/50, file "catalog"), by the byte columns of its
// published byte-by-byte description (1-based, inclusive):
//
//	1–4 HR, 5–14 Name, 76–77 RAh, 78–79 RAm, 80–83 RAs, 84 DE-, 85–86 DEd,
//	87–88 DEm, 89–90 DEs (J2000), 103–107 Vmag, 110–114 B−V,
//	149–154 pmRA, 155–160 pmDE (arcsec/yr, μα·cos δ), 161 n_Parallax,
//	162–166 Parallax (arcsec), 167–170 RadVel (km/s).
//
// Lines may be trimmed of trailing blanks. Rows with a blank position (the
// non-stellar entries of the full catalogue) or a blank V are skipped and
// counted. Distance is 1/parallax for a positive parallax, whether
// trigonometric or marked 'D' (dynamical) — both estimate the distance, and
// the dynamical ones concern bright binaries; otherwise +Inf with
// FlagNoDistance. Names keep the catalogue's Flamsteed/Bayer text (e.g.
// "9Alp CMa") with surrounding blanks removed.
func readBSC5(lr *lineReader, b *builder) error {
	return lr.eachLine(func(line []byte, n int) error {
		id, err := b.integer(col(line, 1, 4), "HR", n)
		if err != nil {
			return err
		}
		if isBlank(col(line, 76, 90)) {
			b.skip("no position", n)
			return nil
		}
		rah, _, err := b.ranged(col(line, 76, 77), "RAh", n, 0, 23)
		if err != nil {
			return err
		}
		ram, _, err := b.ranged(col(line, 78, 79), "RAm", n, 0, 59)
		if err != nil {
			return err
		}
		ras, _, err := b.ranged(col(line, 80, 83), "RAs", n, 0, 60)
		if err != nil {
			return err
		}
		sign := col(line, 84, 84)
		if len(sign) != 1 || (sign[0] != '+' && sign[0] != '-') {
			return &ParseError{File: b.file, Line: n, Field: "DE-", Value: string(sign), Err: fmt.Errorf("%w: want '+' or '-'", ErrNotNumber)}
		}
		ded, _, err := b.ranged(col(line, 85, 86), "DEd", n, 0, 90)
		if err != nil {
			return err
		}
		dem, _, err := b.ranged(col(line, 87, 88), "DEm", n, 0, 59)
		if err != nil {
			return err
		}
		des, _, err := b.ranged(col(line, 89, 90), "DEs", n, 0, 60)
		if err != nil {
			return err
		}
		if anyNaN(rah, ram, ras, ded, dem, des) {
			b.skip("no position", n)
			return nil
		}
		{
			st := Star{ID: id, RV: math.NaN()}
			st.RA = 15 * (rah + ram/60 + ras/3600)
			st.Dec = ded + dem/60 + des/3600
			if sign[0] == '-' {
				st.Dec = -st.Dec
			}
			if st.RA >= 360 {
				return &ParseError{File: b.file, Line: n, Field: "RAh", Value: string(col(line, 76, 83)),
					Err: fmt.Errorf("%w: RA %gh %gm %gs is 24h or more", ErrOutOfRange, rah, ram, ras)}
			}
			if st.Dec > 90 {
				return &ParseError{File: b.file, Line: n, Field: "DEd", Value: string(col(line, 84, 90)),
					Err: fmt.Errorf("%w: declination beyond 90°", ErrOutOfRange)}
			}
			v, ok, err := b.ranged(col(line, 103, 107), "Vmag", n, vmagLo, vmagHi)
			if err != nil {
				return err
			}
			if !ok {
				b.skip("no V magnitude", n)
				return nil
			}
			st.Vmag = v
			bv, _, err := b.ranged(col(line, 110, 114), "B-V", n, bvLo, bvHi)
			if err != nil {
				return err
			}
			st.BV = bv
			pmra, _, err := b.ranged(col(line, 149, 154), "pmRA", n, -pmLim/1000, pmLim/1000)
			if err != nil {
				return err
			}
			pmde, _, err := b.ranged(col(line, 155, 160), "pmDE", n, -pmLim/1000, pmLim/1000)
			if err != nil {
				return err
			}
			if !math.IsNaN(pmra) && !math.IsNaN(pmde) {
				st.PMRA, st.PMDec = pmra*1000, pmde*1000
			}
			if nf := col(line, 161, 161); len(nf) == 1 && nf[0] != ' ' && nf[0] != 'D' {
				return &ParseError{File: b.file, Line: n, Field: "n_Parallax", Value: string(nf), Err: fmt.Errorf("%w: want blank or 'D'", ErrOutOfRange)}
			}
			plx, ok, err := b.ranged(col(line, 162, 166), "Parallax", n, -1, 1)
			if err != nil {
				return err
			}
			var fl Flag
			st.Dist, fl = distFromParallax(plx*1000, ok)
			rv, _, err := b.ranged(col(line, 167, 170), "RadVel", n, -rvLim, rvLim)
			if err != nil {
				return err
			}
			st.RV = rv
			var cf Flag
			st.Teff, cf = starColour(math.NaN(), bv, math.NaN())
			st.Flags = fl | cf
			if name := bytes.TrimSpace(col(line, 5, 14)); len(name) > 0 {
				st.Name = string(name)
			}
			if err := b.add(st, n); err != nil {
				return err
			}
		}
		return nil
	})
}

func anyNaN(v ...float64) bool {
	for _, x := range v {
		if math.IsNaN(x) {
			return true
		}
	}
	return false
}
