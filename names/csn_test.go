package names

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/internal/sharedcat"
)

// The check values below are those of shared/catalogs/README.md, read from
// the IAU-CSN table of 2018-09-07 (IAU WGSN).
func TestReadIAUCSN(t *testing.T) {
	tab, err := ReadFile(sharedcat.IAUCSN(t))
	if err != nil {
		t.Fatal(err)
	}
	if len(tab.Entries) != 335 {
		t.Errorf("%d entries, want 335", len(tab.Entries))
	}
	byName := map[string]Entry{}
	for _, e := range tab.Entries {
		byName[e.Name] = e
	}
	for _, c := range []struct {
		name, id, greek, con string
		hr, hip              int
	}{
		{"Betelgeuse", "alf", "α", "Ori", 2061, 27989},
		{"Sirius", "alf", "α", "CMa", 2491, 32349},
		{"Vega", "alf", "α", "Lyr", 7001, 91262},
		{"Rigil Kentaurus", "alf", "α", "Cen", 5459, 71683},
		{"Toliman", "alf", "α", "Cen", 5460, 71681},
		{"Acamar", "tet01", "θ1", "Eri", 897, 13847},
		{"Alcor", "80", "80", "UMa", 5062, 65477},
		{"Barnard's Star", "V2500", "V2500", "Oph", 0, 87937},
		{"Lich", "", "", "Vir", 0, 0},
	} {
		e, ok := byName[c.name]
		if !ok {
			t.Errorf("%s: missing", c.name)
			continue
		}
		if e.ID != c.id || e.Greek != c.greek || e.Con != c.con || e.HR != c.hr || e.HIP != c.hip {
			t.Errorf("%s: have %s %s %s HR %d HIP %d, want %s %s %s HR %d HIP %d",
				c.name, e.ID, e.Greek, e.Con, e.HR, e.HIP, c.id, c.greek, c.con, c.hr, c.hip)
		}
	}
	if e := byName["Lich"]; !math.IsNaN(e.Vmag) || e.Designation != "PSR B1257+12" {
		t.Errorf("Lich: V %v designation %q, want NaN and PSR B1257+12", e.Vmag, e.Designation)
	}
	if e := byName["Betelgeuse"]; e.Vmag != 0.45 || math.Abs(e.RA-88.792939) > 1e-9 || math.Abs(e.Dec-7.407064) > 1e-9 {
		t.Errorf("Betelgeuse: V %v at %v %v", e.Vmag, e.RA, e.Dec)
	}
}

const hdr = "Name              Designation  IDa   IDb   Con #    WDS_J       Vmag   HIP    HD    RA(J2000)  Dec(J2000) Date\n"
const row = "Quennovar         HR 9201      bet   β     Lyn Aa   07123+4102  4.12   99001  99002 108.123456  41.033333 2019-01-01\n"

// A table of broken files: each must fail with the line and, where it is
// tied to one, the column.
func TestReadBad(t *testing.T) {
	for _, c := range []struct {
		name, text string
		line       int
		field      string
		err        error
	}{
		{"no header", "# comment\n" + row, 2, "", ErrFormat},
		{"header without Designation", "Name   Something\n" + row, 1, "", ErrFormat},
		{"empty", "# only comments\n", 0, "", ErrFormat},
		{"header only", hdr, 0, "", ErrFormat},
		{"too few columns", hdr + "Quennovar         HR 9201      bet   β     Lyn Aa   07123+4102  4.12   99001\n", 2, "", ErrFormat},
		{"name into designation", hdr + "QuennovarQuennovarHR 9201      bet   β     Lyn Aa   07123+4102  4.12   99001  99002 108.123456  41.033333 2019-01-01\n", 2, "Name", ErrFormat},
		{"bad UTF-8", hdr + strings.Replace(row, "β", "\xce", 1), 2, "", ErrUTF8},
		{"duplicate", hdr + row + "# x\n" + strings.Replace(row, "Quennovar", "quenn ovar", 1), 4, "Name", ErrDuplicate},
		{"unknown constellation", hdr + strings.Replace(row, " Lyn ", " Lyx ", 1), 2, "Con", ErrFormat},
		{"bad RA", hdr + strings.Replace(row, "108.123456", "388.123456", 1), 2, "RA(J2000)", ErrFormat},
		{"bad Dec", hdr + strings.Replace(row, " 41.033333", "-97.033333", 1), 2, "Dec(J2000)", ErrFormat},
		{"bad V", hdr + strings.Replace(row, "4.12 ", "4.1x ", 1), 2, "Vmag", ErrFormat},
		{"bad HIP", hdr + strings.Replace(row, "99001", "9900x", 1), 2, "HIP", ErrFormat},
		{"bad HR", hdr + strings.Replace(row, "HR 9201", "HR 92x1", 1), 2, "Designation", ErrFormat},
		{"bad date", hdr + strings.Replace(row, "2019-01-01", "2019/01/01", 1), 2, "Date", ErrFormat},
		{"long line", hdr + strings.Repeat("x", MaxLine+10) + "\n", 2, "", ErrFormat},
	} {
		_, err := Read(strings.NewReader(c.text), "t.txt")
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("%s: err %v, want a *ParseError", c.name, err)
			continue
		}
		if pe.Line != c.line || pe.Field != c.field || !errors.Is(err, c.err) || pe.File != "t.txt" {
			t.Errorf("%s: %v: line %d field %q, want line %d field %q (%v)", c.name, err, pe.Line, pe.Field, c.line, c.field, c.err)
		}
	}
	if _, err := Read(strings.NewReader(hdr+row+strings.Replace(strings.Replace(row, "Quennovar", "Tassbrine", 1), "\n", "\r\n", 1)), "crlf.txt"); err != nil {
		t.Errorf("CRLF line endings: %v", err)
	}
}

// FuzzRead: any input either reads into entries that keep the reader's
// promises or fails with a *ParseError; never a panic.
func FuzzRead(f *testing.F) {
	f.Add(hdr + row)
	f.Add("# c\n" + hdr + row + row)
	f.Add(hdr + "Marrel Vost       HR 9202      gam   γ     Cen A    14396-6050 -0.51   99003 999004 219.123456 -60.123456 2019-02-02\n")
	f.Add(hdr + "Orrimel           PSR B9999+99 -     -     Vir -    -              -       -      - 195.123456  12.123456 2019-03-03\n")
	f.Fuzz(func(t *testing.T, s string) {
		tab, err := Read(strings.NewReader(s), "fuzz")
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v is not a *ParseError", err)
			}
			return
		}
		seen := map[string]bool{}
		for _, e := range tab.Entries {
			if e.Name == "" || seen[foldName(e.Name)] {
				t.Fatalf("entry %+v: empty or duplicate name", e)
			}
			seen[foldName(e.Name)] = true
			if !(e.RA >= 0 && e.RA < 360 && e.Dec >= -90 && e.Dec <= 90) {
				t.Fatalf("entry %+v: position out of range", e)
			}
		}
	})
}
