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
