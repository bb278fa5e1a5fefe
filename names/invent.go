package names

import (
	"math/rand/v2"
	"sort"
	"strings"

	"github.com/skyframe/skyframe/catalog"
)

// InventedCount is how many of the built-in sky's brightest sampled stars
// get an invented name (the invented nearby stars have theirs already).
const InventedCount = 24

// inventStream is the PCG stream of the name generator, so that the names
// do not share a random sequence with the sky sampler that uses the same seed.
const inventStream = 0x6e616d6573 // "names"

// Syllables of invented names: an onset, a vowel and an optional coda.
// Chosen to read easily in English; the names are made up, none is meant
// to be a real star's (the test compares them with the IAU table).
var (
	onsets = []string{"b", "br", "c", "d", "dr", "f", "g", "gr", "h", "k", "l", "m", "n", "p",
		"r", "s", "sk", "st", "t", "th", "tr", "v", "w", "z"}
	vowels = []string{"a", "e", "i", "o", "u", "a", "e", "o", "ae", "ei", "ou", "y"}
	codas  = []string{"", "", "", "n", "r", "l", "s", "th", "nd", "rk", "m", "ck", "ll", "st"}
)

// Invent returns n distinct invented star names, stable for a seed: each is
// two or three syllables, capitalised, 5 to 11 letters, and none equals a
// name of the invented nearby stars (catalog.NearbyStars).
func Invent(seed uint64, n int) []string {
	rng := rand.New(rand.NewPCG(seed, inventStream))
	seen := map[string]bool{}
	for _, s := range catalog.NearbyStars() {
		seen[foldName(s.Name)] = true
	}
	out := make([]string, 0, n)
	for len(out) < n {
		var b strings.Builder
		syl := 2 + rng.IntN(2)
		for k := 0; k < syl; k++ {
			b.WriteString(onsets[rng.IntN(len(onsets))])
			b.WriteString(vowels[rng.IntN(len(vowels))])
			if k == syl-1 || rng.IntN(3) == 0 {
				b.WriteString(codas[rng.IntN(len(codas))])
			}
		}
		w := b.String()
		if len(w) < 5 || len(w) > 11 || seen[w] || !pronounceable(w) {
			continue
		}
		seen[w] = true
		out = append(out, strings.ToUpper(w[:1])+w[1:])
	}
	return out
}

// inventBuiltIn names the InventedCount brightest sampled stars of a
// built-in sky (ids from catalog.SyntheticIDBase up to, not including,
// catalog.NearbyIDBase), brightest first, with Invent(catalog.DefaultSynthSeed).
func inventBuiltIn(s *catalog.Stars) map[int]string {
	var rows []int
	for i, id := range s.ID {
		if id >= catalog.SyntheticIDBase && id < catalog.NearbyIDBase {
			rows = append(rows, i)
		}
	}
	sort.SliceStable(rows, func(a, b int) bool { return s.Vmag[rows[a]] < s.Vmag[rows[b]] })
	if len(rows) > InventedCount {
		rows = rows[:InventedCount]
	}
	nm := Invent(catalog.DefaultSynthSeed, len(rows))
	out := make(map[int]string, len(rows))
	for k, i := range rows {
		out[i] = nm[k]
	}
	return out
}

// pronounceable refuses three consonants or three vowels in a row (a
// consonant pair with h, as in "th", does not count), and "hh".
func pronounceable(w string) bool {
	if strings.Contains(w, "hh") {
		return false
	}
	run, vowel := 0, false
	for i := 0; i < len(w); i++ {
		c := w[i]
		if c == 'h' {
			continue
		}
		v := strings.IndexByte("aeiouy", c) >= 0
		if i > 0 && v == vowel {
			run++
		} else {
			run = 1
		}
		vowel = v
		if run >= 3 {
			return false
		}
	}
	return true
}
