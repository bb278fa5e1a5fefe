package names

import (
	"strconv"
	"strings"
	"unicode"
)

// greekLetters are the 24 letters of the Greek alphabet in order (index+1
// is Designation.Letter) with the spellings a query may use: the Latin
// name, the SIMBAD abbreviation (used by the IAU-CSN table), the Bright Star
// Catalogue's abbreviation and the lower-case letter itself (Unicode, with
// its variant forms).
var greekLetters = [24]struct {
	name   string
	spells []string
	letter string
}{
	{"alpha", []string{"alf", "alp", "α"}, "α"},
	{"beta", []string{"bet", "β", "ϐ"}, "β"},
	{"gamma", []string{"gam", "γ"}, "γ"},
	{"delta", []string{"del", "δ"}, "δ"},
	{"epsilon", []string{"eps", "ε", "ϵ"}, "ε"},
	{"zeta", []string{"zet", "ζ"}, "ζ"},
	{"eta", []string{"η"}, "η"},
	{"theta", []string{"tet", "the", "θ", "ϑ"}, "θ"},
	{"iota", []string{"iot", "ι"}, "ι"},
	{"kappa", []string{"kap", "κ", "ϰ"}, "κ"},
	{"lambda", []string{"lam", "λ"}, "λ"},
	{"mu", []string{"μ"}, "μ"},
	{"nu", []string{"ν"}, "ν"},
	{"xi", []string{"ksi", "ξ"}, "ξ"},
	{"omicron", []string{"omi", "ο"}, "ο"},
	{"pi", []string{"π", "ϖ"}, "π"},
	{"rho", []string{"ρ", "ϱ"}, "ρ"},
	{"sigma", []string{"sig", "σ", "ς"}, "σ"},
	{"tau", []string{"τ"}, "τ"},
	{"upsilon", []string{"ups", "υ"}, "υ"},
	{"phi", []string{"φ", "ϕ"}, "φ"},
	{"chi", []string{"χ"}, "χ"},
	{"psi", []string{"ψ"}, "ψ"},
	{"omega", []string{"ome", "ω"}, "ω"},
}

// constellations are the 88 IAU constellations: abbreviation, Latin name
// and genitive, as in the IAU Style Manual (Wilkins 1989, Table 11; quoted
// from memory).
var constellations = [88]struct{ abbr, name, genitive string }{
	{"And", "Andromeda", "Andromedae"}, {"Ant", "Antlia", "Antliae"}, {"Aps", "Apus", "Apodis"},
	{"Aqr", "Aquarius", "Aquarii"}, {"Aql", "Aquila", "Aquilae"}, {"Ara", "Ara", "Arae"},
	{"Ari", "Aries", "Arietis"}, {"Aur", "Auriga", "Aurigae"}, {"Boo", "Boötes", "Boötis"},
	{"Cae", "Caelum", "Caeli"}, {"Cam", "Camelopardalis", "Camelopardalis"}, {"Cnc", "Cancer", "Cancri"},
	{"CVn", "Canes Venatici", "Canum Venaticorum"}, {"CMa", "Canis Major", "Canis Majoris"},
	{"CMi", "Canis Minor", "Canis Minoris"}, {"Cap", "Capricornus", "Capricorni"},
	{"Car", "Carina", "Carinae"}, {"Cas", "Cassiopeia", "Cassiopeiae"}, {"Cen", "Centaurus", "Centauri"},
	{"Cep", "Cepheus", "Cephei"}, {"Cet", "Cetus", "Ceti"}, {"Cha", "Chamaeleon", "Chamaeleontis"},
	{"Cir", "Circinus", "Circini"}, {"Col", "Columba", "Columbae"},
	{"Com", "Coma Berenices", "Comae Berenices"}, {"CrA", "Corona Australis", "Coronae Australis"},
	{"CrB", "Corona Borealis", "Coronae Borealis"}, {"Crv", "Corvus", "Corvi"}, {"Crt", "Crater", "Crateris"},
	{"Cru", "Crux", "Crucis"}, {"Cyg", "Cygnus", "Cygni"}, {"Del", "Delphinus", "Delphini"},
	{"Dor", "Dorado", "Doradus"}, {"Dra", "Draco", "Draconis"}, {"Equ", "Equuleus", "Equulei"},
	{"Eri", "Eridanus", "Eridani"}, {"For", "Fornax", "Fornacis"}, {"Gem", "Gemini", "Geminorum"},
	{"Gru", "Grus", "Gruis"}, {"Her", "Hercules", "Herculis"}, {"Hor", "Horologium", "Horologii"},
	{"Hya", "Hydra", "Hydrae"}, {"Hyi", "Hydrus", "Hydri"}, {"Ind", "Indus", "Indi"},
	{"Lac", "Lacerta", "Lacertae"}, {"Leo", "Leo", "Leonis"}, {"LMi", "Leo Minor", "Leonis Minoris"},
	{"Lep", "Lepus", "Leporis"}, {"Lib", "Libra", "Librae"}, {"Lup", "Lupus", "Lupi"},
	{"Lyn", "Lynx", "Lyncis"}, {"Lyr", "Lyra", "Lyrae"}, {"Men", "Mensa", "Mensae"},
	{"Mic", "Microscopium", "Microscopii"}, {"Mon", "Monoceros", "Monocerotis"},
	{"Mus", "Musca", "Muscae"}, {"Nor", "Norma", "Normae"}, {"Oct", "Octans", "Octantis"},
	{"Oph", "Ophiuchus", "Ophiuchi"}, {"Ori", "Orion", "Orionis"}, {"Pav", "Pavo", "Pavonis"},
	{"Peg", "Pegasus", "Pegasi"}, {"Per", "Perseus", "Persei"}, {"Phe", "Phoenix", "Phoenicis"},
	{"Pic", "Pictor", "Pictoris"}, {"Psc", "Pisces", "Piscium"},
	{"PsA", "Piscis Austrinus", "Piscis Austrini"}, {"Pup", "Puppis", "Puppis"},
	{"Pyx", "Pyxis", "Pyxidis"}, {"Ret", "Reticulum", "Reticuli"}, {"Sge", "Sagitta", "Sagittae"},
	{"Sgr", "Sagittarius", "Sagittarii"}, {"Sco", "Scorpius", "Scorpii"},
	{"Scl", "Sculptor", "Sculptoris"}, {"Sct", "Scutum", "Scuti"}, {"Ser", "Serpens", "Serpentis"},
	{"Sex", "Sextans", "Sextantis"}, {"Tau", "Taurus", "Tauri"}, {"Tel", "Telescopium", "Telescopii"},
	{"Tri", "Triangulum", "Trianguli"}, {"TrA", "Triangulum Australe", "Trianguli Australis"},
	{"Tuc", "Tucana", "Tucanae"}, {"UMa", "Ursa Major", "Ursae Majoris"},
	{"UMi", "Ursa Minor", "Ursae Minoris"}, {"Vel", "Vela", "Velorum"}, {"Vir", "Virgo", "Virginis"},
	{"Vol", "Volans", "Volantis"}, {"Vul", "Vulpecula", "Vulpeculae"},
}

var (
	// greekIndex maps every folded spelling of a letter to its 1-based index.
	greekIndex = map[string]int{}
	// conIndex maps folded abbreviations, names and genitives to the index
	// in constellations.
	conIndex = map[string]int{}
)

func init() {
	for i, g := range greekLetters {
		greekIndex[g.name] = i + 1
		for _, s := range g.spells {
			greekIndex[s] = i + 1
		}
	}
	for i, c := range constellations {
		for _, s := range []string{c.abbr, c.name, c.genitive} {
			conIndex[foldName(s)] = i
		}
	}
}

// Designation is a Bayer and/or Flamsteed designation.
type Designation struct {
	Flamsteed int // Flamsteed number; 0 for none
	Letter    int // Bayer letter, 1 (α) … 24 (ω); 0 for none
	Sup       int // superscript of the Bayer letter (α¹, α²); 0 for none
	Con       int // index into the 88 constellations; valid when Letter or Flamsteed > 0
}

// ParseDesignation reads a Bayer or Flamsteed designation in any of its
// common spellings: "alf Ori", "α Ori", "Alpha Orionis", "Alp Ori",
// "58 Ori", "58 Alp Ori", the Bright Star Catalogue's "58Alp Ori" and
// "Alp1Cen", the IAU-CSN table's "tet01 Eri", "θ1 Eri", "α¹ Cen". Case and
// blanks do not matter. ok is false when s is not a designation.
func ParseDesignation(s string) (d Designation, ok bool) {
	tok := tokens(s)
	i := 0
	if i < len(tok) && isDigits(tok[i]) {
		n, err := strconv.Atoi(tok[i])
		if err != nil || n <= 0 || n > 999 {
			return d, false
		}
		d.Flamsteed = n
		i++
	}
	if i < len(tok) {
		if g, isG := greekIndex[tok[i]]; isG && i+1 < len(tok) {
			d.Letter = g
			i++
			if i+1 < len(tok) && isDigits(tok[i]) {
				n, err := strconv.Atoi(tok[i])
				if err != nil || n <= 0 || n > 99 {
					return d, false
				}
				d.Sup = n
				i++
			}
		}
	}
	if d.Flamsteed == 0 && d.Letter == 0 || i >= len(tok) {
		return d, false
	}
	c, isC := conIndex[strings.Join(tok[i:], "")]
	if !isC {
		return d, false
	}
	d.Con = c
	return d, true
}

// Bayer returns the Bayer designation with the Greek letter and the
// constellation abbreviation, "α Ori", "α¹ Cen"; "" when there is no letter.
func (d Designation) Bayer() string {
	if d.Letter < 1 || d.Letter > 24 {
		return ""
	}
	s := greekLetters[d.Letter-1].letter
	if d.Sup > 0 {
		s += superscript(d.Sup)
	}
	return s + " " + constellations[d.Con].abbr
}

// FlamsteedName returns "58 Ori"; "" when there is no Flamsteed number.
func (d Designation) FlamsteedName() string {
	if d.Flamsteed <= 0 {
		return ""
	}
	return strconv.Itoa(d.Flamsteed) + " " + constellations[d.Con].abbr
}

// String is the Bayer form when there is a letter, else the Flamsteed form.
func (d Designation) String() string {
	if b := d.Bayer(); b != "" {
		return b
	}
	return d.FlamsteedName()
}

// keys are the index keys of a catalogue designation: the Bayer letter with
// and without its superscript, and the Flamsteed number.
func (d Designation) keys() []string {
	var k []string
	if d.Letter > 0 {
		k = append(k, bayerKey(d.Letter, 0, d.Con))
		if d.Sup > 0 {
			k = append(k, bayerKey(d.Letter, d.Sup, d.Con))
		}
	}
	if d.Flamsteed > 0 {
		k = append(k, "f:"+strconv.Itoa(d.Flamsteed)+":"+strconv.Itoa(d.Con))
	}
	return k
}

// queryKey is the one key a query designation is looked up by: the Bayer
// letter (with its superscript if given), else the Flamsteed number.
func (d Designation) queryKey() string {
	if d.Letter > 0 {
		return bayerKey(d.Letter, d.Sup, d.Con)
	}
	return "f:" + strconv.Itoa(d.Flamsteed) + ":" + strconv.Itoa(d.Con)
}

func bayerKey(letter, sup, con int) string {
	return "b:" + strconv.Itoa(letter) + ":" + strconv.Itoa(sup) + ":" + strconv.Itoa(con)
}

func superscript(n int) string {
	const sup = "⁰¹²³⁴⁵⁶⁷⁸⁹"
	digits := []rune(sup)
	var b strings.Builder
	for _, c := range strconv.Itoa(n) {
		b.WriteRune(digits[c-'0'])
	}
	return b.String()
}

// tokens splits s into lower-case runs of digits (superscript digits read
// as digits), runs of Latin letters, and single Greek letters; everything
// else separates.
func tokens(s string) []string {
	var out []string
	var cur []rune
	kind := 0 // 1 digits, 2 letters
	flush := func() {
		if len(cur) > 0 {
			out = append(out, string(cur))
			cur = cur[:0]
		}
		kind = 0
	}
	for _, r := range s {
		if d := supDigit(r); d >= 0 {
			r = rune('0' + d)
		}
		switch {
		case r >= '0' && r <= '9':
			if kind != 1 {
				flush()
			}
			kind = 1
			cur = append(cur, r)
		case unicode.Is(unicode.Greek, r):
			flush()
			out = append(out, string(unicode.ToLower(r)))
		case unicode.IsLetter(r):
			if kind != 2 {
				flush()
			}
			kind = 2
			cur = append(cur, foldRune(unicode.ToLower(r)))
		default:
			flush()
		}
	}
	flush()
	return out
}

func supDigit(r rune) int {
	switch r {
	case '⁰':
		return 0
	case '¹':
		return 1
	case '²':
		return 2
	case '³':
		return 3
	}
	if r >= '⁴' && r <= '⁹' {
		return int(r - '⁴' + 4)
	}
	return -1
}

func isDigits(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return true
}

// foldRune maps the accented Latin letters that occur in star and
// constellation names to their base letter.
func foldRune(r rune) rune {
	switch r {
	case 'à', 'á', 'â', 'ä', 'ã', 'å', 'ā':
		return 'a'
	case 'è', 'é', 'ê', 'ë', 'ē':
		return 'e'
	case 'ì', 'í', 'î', 'ï', 'ī':
		return 'i'
	case 'ò', 'ó', 'ô', 'ö', 'õ', 'ō':
		return 'o'
	case 'ù', 'ú', 'û', 'ü', 'ū':
		return 'u'
	case 'ñ':
		return 'n'
	case 'ç':
		return 'c'
	}
	return r
}

// foldName is how proper names compare: lower case, accents folded, only
// letters and digits kept ("Barnard's Star" → "barnardsstar").
func foldName(s string) string {
	var b strings.Builder
	for _, r := range s {
		if d := supDigit(r); d >= 0 {
			r = rune('0' + d)
		}
		if unicode.IsLetter(r) || unicode.IsDigit(r) {
			b.WriteRune(foldRune(unicode.ToLower(r)))
		}
	}
	return b.String()
}
