package report

import (
	"encoding/json"
	"fmt"
	"slices"
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
// curves) named by labels: a warning every list holds is said once, as it
// is; one that only some lists hold is said once for each of them,
// "LABEL: warning". Order: as first met, list by list. A single list
// comes back as it is.
func Combine(labels []string, lists []Warnings) Warnings {
	out := Warnings{}
	if len(lists) == 1 {
		out.Merge(lists[0])
		return out
	}
	for i, l := range lists {
		for _, s := range l {
			everywhere := true
			for _, o := range lists {
				everywhere = everywhere && slices.Contains(o, s)
			}
			if everywhere {
				out.Add("%s", s)
			} else {
				out.Add("%s: %s", labels[i], s)
			}
		}
	}
	return out
}
