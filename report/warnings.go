package report

import (
	"encoding/json"
	"fmt"
	"slices"
	"strconv"
	"strings"
)

// Warnings is a list of one-line warnings for people, each said once. It
// marshals to a JSON array, [] when empty (never null).
type Warnings []string

// Add appends a warning built like fmt.Sprintf, unless the same text is
// already there.
func (w *Warnings) Add(format string, a ...any) {
	s := fmt.Sprintf(format, a...)
	if !slices.Contains(*w, s) {
		*w = append(*w, s)
	}
}

// Merge adds every warning of o not already there, in order.
func (w *Warnings) Merge(o []string) {
	for _, s := range o {
		if !slices.Contains(*w, s) {
			*w = append(*w, s)
		}
	}
}

// MarshalJSON implements json.Marshaler.
func (w Warnings) MarshalJSON() ([]byte, error) {
	if w == nil {
		return []byte("[]"), nil
	}
	return json.Marshal([]string(w))
}

// Combine joins the warnings of several results (conditions, variants,
// curves) named by labels. Warnings that read the same but for their
// figures ("Q1's collector sits 230 mV from ground" at one supply, "…
// 620.6 mV …" at another) are one finding and are said once, each figure
// that differs given as its range ("230 to 620.6 mV"):
//
//   - held by every result with the same figures: as it is;
//   - held by one result only: "LABEL: warning";
//   - otherwise: the warning, then whom it concerns, "(in A and B)", "(in
//     A, B, C and 4 more)", "(in both)" or "(in all 12)".
//
// Order: as first met, list by list. A single list comes back as it is.
func Combine(labels []string, lists []Warnings) Warnings {
	out := Warnings{}
	if len(lists) == 1 {
		out.Merge(lists[0])
		return out
	}
	type finding struct {
		texts []string
		who   []int // the lists that hold it, in order
	}
	var order []string
	groups := map[string]*finding{}
	for i, l := range lists {
		for _, s := range l {
			k := shape(s)
			g := groups[k]
			if g == nil {
				g = &finding{}
				groups[k] = g
				order = append(order, k)
			}
			g.texts = append(g.texts, s)
			if !slices.Contains(g.who, i) {
				g.who = append(g.who, i)
			}
		}
	}
	for _, k := range order {
		g := groups[k]
		text := merge(g.texts)
		same := !slices.ContainsFunc(g.texts, func(t string) bool { return t != g.texts[0] })
		switch {
		case len(g.who) == len(lists) && same:
			out.Add("%s", text)
		case len(g.who) == 1:
			out.Add("%s: %s", labels[g.who[0]], text)
		case len(g.who) == 2 && len(lists) == 2:
			out.Add("%s (in both)", text)
		case len(g.who) == len(lists):
			out.Add("%s (in all %d)", text, len(lists))
		default:
			names := make([]string, len(g.who))
			for n, i := range g.who {
				names[n] = labels[i]
			}
			out.Add("%s (in %s)", text, listNames(names))
		}
	}
	return out
}

// listNames writes "A", "A and B", "A, B and C", "A, B, C and 4 more".
func listNames(n []string) string {
	if len(n) > 3 {
		return strings.Join(n[:3], ", ") + fmt.Sprintf(" and %d more", len(n)-3)
	}
	if len(n) == 1 {
		return n[0]
	}
	return strings.Join(n[:len(n)-1], ", ") + " and " + n[len(n)-1]
}

// figures splits a warning into its text between figures and its figures:
// a figure is a decimal number (a sign, digits, a fraction) that does not
// continue a name ("Q1", "H2", "fuzz.c1" hold none).
func figures(s string) (text, nums []string) {
	start := 0
	for i := 0; i < len(s); {
		j := i
		if s[j] == '-' || s[j] == '+' {
			j++
		}
		if j < len(s) && isDigit(s[j]) && (i == 0 || !isNameByte(s[i-1])) {
			for j < len(s) && isDigit(s[j]) {
				j++
			}
			if j+1 < len(s) && s[j] == '.' && isDigit(s[j+1]) {
				j++
				for j < len(s) && isDigit(s[j]) {
					j++
				}
			}
			text = append(text, s[start:i])
			nums = append(nums, s[i:j])
			start, i = j, j
			continue
		}
		i++
	}
	return append(text, s[start:]), nums
}

func isDigit(b byte) bool { return b >= '0' && b <= '9' }
func isNameByte(b byte) bool {
	return isDigit(b) || b == '_' || b == '.' || b >= 'A' && b <= 'Z' || b >= 'a' && b <= 'z'
}

// shape is a warning with its figures blanked: warnings of one shape say
// the same thing about different figures.
func shape(s string) string {
	text, _ := figures(s)
	return strings.Join(text, "#")
}

// merge writes warnings of one shape as one: each figure that differs
// among them becomes "lowest to highest".
func merge(ws []string) string {
	text, first := figures(ws[0])
	var b strings.Builder
	for k, t := range text {
		b.WriteString(t)
		if k == len(first) {
			break
		}
		lo, hi := first[k], first[k]
		for _, w := range ws[1:] {
			_, nums := figures(w)
			v, _ := strconv.ParseFloat(nums[k], 64)
			if l, _ := strconv.ParseFloat(lo, 64); v < l {
				lo = nums[k]
			}
			if h, _ := strconv.ParseFloat(hi, 64); v > h {
				hi = nums[k]
			}
		}
		b.WriteString(lo)
		if hi != lo {
			b.WriteString(" to " + hi)
		}
	}
	return b.String()
}
