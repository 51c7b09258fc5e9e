package chains

import (
	"sort"
	"strings"
)

// editDistance is the optimal-string-alignment distance between a and b:
// the fewest insertions, deletions, substitutions and swaps of two
// neighbouring characters that turn one into the other (Levenshtein
// distance extended by transpositions; F. J. Damerau, "A technique for
// computer detection and correction of spelling errors", Comm. ACM 7(3),
// 1964). It counts runes, not bytes, so "µ" is one character.
func editDistance(a, b string) int {
	r, s := []rune(a), []rune(b)
	prev2 := make([]int, len(s)+1)
	prev := make([]int, len(s)+1)
	cur := make([]int, len(s)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(r); i++ {
		cur[0] = i
		for j := 1; j <= len(s); j++ {
			cost := 1
			if r[i-1] == s[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
			if i > 1 && j > 1 && r[i-1] == s[j-2] && r[i-2] == s[j-1] {
				cur[j] = min(cur[j], prev2[j-2]+1)
			}
		}
		prev2, prev, cur = prev, cur, prev2
	}
	return prev[len(s)]
}

// slipDistance is how far a written name may be from a known one to be
// taken for a slip of the hand: names differing only in case always are;
// otherwise one edit for names of up to four characters and two for longer
// ones (a one-letter name only towards a longer name that starts with it).
// The bound is this project's own: short node names ("c1", "b2") are one
// edit from many others, so a second edit would flag deliberate names.
func slipDistance(written string) int {
	if len([]rune(written)) <= 4 {
		return 1
	}
	return 2
}

// closest returns the candidate a written name is most likely a slip for,
// or "": one that differs only in case first, then the nearest within
// slipDistance (ties go to the first in sorted order). The written name
// itself is never suggested.
func closest(written string, candidates []string) string {
	cs := append([]string(nil), candidates...)
	sort.Strings(cs)
	for _, c := range cs {
		if c != written && strings.EqualFold(c, written) {
			return c
		}
	}
	best, bestD := "", slipDistance(written)+1
	for _, c := range cs {
		if c == written {
			continue
		}
		if len([]rune(written)) == 1 && !strings.HasPrefix(strings.ToLower(c), strings.ToLower(written)) {
			continue // one letter is one edit from every other letter: only a longer name that starts with it
		}
		if d := editDistance(strings.ToLower(written), strings.ToLower(c)); d < bestD {
			best, bestD = c, d
		}
	}
	return best
}

// didYouMean is "; did you mean X?" for the closest candidate, or "".
func didYouMean(written string, candidates []string) string {
	if c := closest(written, candidates); c != "" {
		return "; did you mean " + quote(c) + "?"
	}
	return ""
}

// quote writes a name in double quotes, as it is written in a chain file.
func quote(s string) string { return `"` + s + `"` }
