package names

import (
	"math/rand/v2"
	"strings"

	"github.com/skyframe/skyframe/catalog"
)

// InventedVLimit: the built-in sky's sampled stars with catalogue V at or
// brighter than this get an invented name (24 in the default sky; the
// invented nearby stars have theirs already). A threshold rather than a
// count, so that a star's name does not depend on which other rows are at
// hand (a deeper sky, a chunk of a streamed cache).
const InventedVLimit = 1.6

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
	out := make([]string, 0, n)
	for len(out) < n {
		w := inventOne(rng)
		if seen[w] {
			continue
		}
		seen[w] = true
		out = append(out, w)
	}
	return out
}

// InventName returns the invented name of the star with catalogue id in a
// sky of the given seed: a function of the two only, like Invent's names.
func InventName(seed uint64, id int64) string {
	return inventOne(rand.New(rand.NewPCG(seed^inventStream, uint64(id))))
}

// inventOne draws names from rng until one is 5–11 letters, pronounceable
// and not a name of the invented nearby stars.
func inventOne(rng *rand.Rand) string {
	for {
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
		if len(w) < 5 || len(w) > 11 || !pronounceable(w) || isNearbyName(w) {
			continue
		}
		return strings.ToUpper(w[:1]) + w[1:]
	}
}

func isNearbyName(w string) bool {
	for _, s := range catalog.NearbyStars() {
		if foldName(s.Name) == w {
			return true
		}
	}
	return false
}

// inventBuiltIn names the sampled stars of a built-in sky (ids from
// catalog.SyntheticIDBase up to, not including, catalog.NearbyIDBase) with
// V ≤ InventedVLimit: InventName(catalog.DefaultSynthSeed, id).
func inventBuiltIn(s *catalog.Stars) map[int]string {
	out := map[int]string{}
	for i, id := range s.ID {
		if id >= catalog.SyntheticIDBase && id < catalog.NearbyIDBase && s.Vmag[i] <= InventedVLimit {
			out[i] = InventName(catalog.DefaultSynthSeed, id)
		}
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
