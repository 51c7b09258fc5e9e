package abtest

import (
	"math/rand/v2"

	"renderchain/analyze"
	"renderchain/report"
)

// NeutralLabel returns the i-th neutral label of a blind set (i ≥ 0):
// A, B, …, Z, AA, AB, … (bijective base 26, like spreadsheet columns).
func NeutralLabel(i int) string {
	var b []byte
	for n := i + 1; n > 0; n = (n - 1) / 26 {
		b = append([]byte{byte('A' + (n-1)%26)}, b...)
	}
	return string(b)
}

// Shuffle returns the permutation of a blind set of n clips drawn from seed:
// neutral label i (NeutralLabel(i)) is given to clip p[i]. It is a
// Fisher–Yates shuffle (rand.Perm) driven by a PCG generator seeded with
// (seed, 0x6162746573740a00), so a seed always gives the same set.
func Shuffle(n int, seed int64) []int {
	r := rand.New(rand.NewPCG(uint64(seed), 0x6162746573740a00))
	return r.Perm(n)
}

// Key maps the clips of a blind set back to what they are. It is written to
// a file of its own, outside the set's folder, and can be loaded into the
// listening page to reveal the labels.
type Key struct {
	Note  string    `json:"note"`
	Set   string    `json:"set"` // the set folder's name
	Seed  int64     `json:"seed"`
	Clips []KeyClip `json:"clips"`
}

// KeyClip is one entry of a Key.
type KeyClip struct {
	Blind     string         `json:"blind_label"`
	File      string         `json:"file"`
	Label     string         `json:"label"`
	Bypass    bool           `json:"bypass"`
	ChainFile string         `json:"chain_file,omitempty"`
	Settings  []string       `json:"settings"`
	GainDB    report.Level   `json:"gain_db"`
	TruePeak  report.Level   `json:"true_peak_dbtp"` // as written
	Before    analyze.Levels `json:"before_gain"`
	LRA       report.Level   `json:"loudness_range_lu"`
	Flag      string         `json:"flag,omitempty"`
	Warnings  []string       `json:"warnings"`
}
