package abtest

import (
	"encoding/json"

	"renderchain/analyze"
	"renderchain/chains"
	"renderchain/outputs"
	"renderchain/report"
)

// File names inside the set's folder.
const (
	ManifestFile       = "ab.json"
	PageFile           = "index.html"
	DefaultBypassLabel = "bypass"
)

// HearingCaution is shown on the listening page and recorded in ab.json.
const HearingCaution = "Hearing caution: fuzz clips are dense and loud. Turn your playback volume down before " +
	"pressing play and raise it slowly; keep sessions short and take breaks. The players here start at half volume."

// Options configure Build. TargetLUFS and CeilingDBTP are used as given (0
// is a legal value for both): start from DefaultTargetLUFS and
// DefaultCeilingDBTP.
type Options struct {
	Chain     *chains.Chain // the chain variants start from, its --set overrides applied
	ChainPath string        // where Chain was read; "@FILE" variants are also looked for beside it
	Dry       string        // the dry take: WAV, mono or stereo, render.MinRate…render.MaxRate
	OutDir    string        // the set's folder

	// Variants to render. None: one variant, the chain as written, labelled
	// after the chain file's name.
	Variants    []Variant
	NoBypass    bool   // leave out the dry bypass clip
	BypassLabel string // label of the bypass clip; "" means DefaultBypassLabel

	Oversample  int     // 0: the chain's own setting or engine.DefaultOversample (engine.Oversample)
	TargetLUFS  float64 // common integrated loudness wanted, −70…0 LUFS
	CeilingDBTP float64 // no clip's true peak above this, −40…0 dBTP
	Format      string  // clip samples: render.FormatPCM24 (""), FormatPCM16, FormatFloat32

	Sequence SequenceOptions

	Blind   bool   // neutral labels, shuffled by Seed; a key file maps them back
	Seed    int64  // shuffle seed of a blind set
	KeyPath string // key file of a blind set; "" means DIR-key.json beside DIR

	// PlotDir, if set, is a folder of PNG plots made for the variants (for
	// instance by the measurement bench): files named SLUG.TITLE.png, SLUG
	// being the variant's label in file-name form (see Slug), are copied into
	// the set under the clip's own name and shown on the page.
	PlotDir string

	// Pictures asks for the set's own pictures, every variant in one
	// figure each (see PictureOptions); not in a blind set.
	Pictures PictureOptions

	Force bool // replace the clips of an earlier run in OutDir
	Jobs  int  // variants rendered at once; 0 means runtime.NumCPU()

	// Progress, if set, is called now and then with work done and total
	// (in frames), never from two goroutines at once.
	Progress func(done, total int64)

	// Outputs, if set, is the caller's outputs.Set, not yet checked: Build
	// declares the take, the chain files, OutDir (role "output") and the key
	// (role "key") in it, checks it before any work and commits it; the
	// caller can then read its Changed. Nil: Build uses a set of its own.
	Outputs *outputs.Set
}

// Set describes a written A/B set; it is what ab.json holds. In a blind
// set, ab.json lists only neutral labels, files and loudness (see
// MarshalJSON); the Go value keeps everything.
type Set struct {
	Chain          string          `json:"chain"`
	ChainFile      string          `json:"chain_file"`
	Dry            Take            `json:"dry"`
	TargetLUFS     report.Level    `json:"target_lufs"` // the loudness every clip was brought to
	RequestedLUFS  report.Level    `json:"requested_target_lufs"`
	CeilingDBTP    report.Level    `json:"ceiling_dbtp"`
	CeilingLimited bool            `json:"ceiling_limited"` // the ceiling, not the request, set target_lufs
	SpreadLU       report.Level    `json:"spread_lu"`       // loudest minus quietest clip, as written
	Oversample     int             `json:"oversample"`
	Format         string          `json:"format"`
	Blind          bool            `json:"blind"`
	Variants       []Clip          `json:"variants"`
	Sequence       *Sequence       `json:"sequence"` // null without a sequence file
	Pictures       []Plot          `json:"pictures"` // the set's own pictures (PictureOptions), in page order
	Page           string          `json:"page"`
	HearingCaution string          `json:"hearing_caution"`
	Warnings       report.Warnings `json:"warnings"`

	Dir     string `json:"-"` // the folder written
	KeyFile string `json:"-"` // the key file written (blind sets)
	Key     *Key   `json:"-"`
}

// Take describes the dry take.
type Take = report.WAV

// Clip is one clip of a set: a variant or the bypass.
type Clip struct {
	Label        string         `json:"label"`
	File         string         `json:"file"`
	GainDB       report.Level   `json:"gain_db"`        // applied to the render (or the dry take)
	LUFS         report.Level   `json:"lufs"`           // of the file as written
	TruePeakDBTP report.Level   `json:"true_peak_dbtp"` // of the file as written
	PeakDBFS     report.Level   `json:"peak_dbfs"`
	LRA          report.Level   `json:"loudness_range_lu"` // EBU Tech 3342; null under 3.1 s
	Before       analyze.Levels `json:"before_gain"`
	Bypass       bool           `json:"bypass"`
	ChainFile    string         `json:"chain_file,omitempty"` // another chain file the variant starts from
	SupplyV      float64        `json:"supply_v,omitempty"`   // the variant's supply (its chain file's polarity kept)
	Settings     []string       `json:"settings"`             // --set overrides; empty: the chain as written
	Solver       *report.Solver `json:"solver,omitempty"`
	Plots        []Plot         `json:"plots"`
	// GainOverOthersDB is the clip's gain minus the median gain of the
	// clips it is compared with (GainOverOthers); null for the bypass.
	GainOverOthersDB report.Level `json:"gain_over_others_db"`
	// Flag is MuchQuieter when GainOverOthersDB passes QuieterLimitDB.
	Flag string `json:"flag,omitempty"`
	// Warnings are the variant's chain's (build, stability and its
	// rendered check, operating point; bias.Warnings), the flag first.
	Warnings   report.Warnings `json:"warnings"`
	BlindLabel string          `json:"-"` // the neutral label of a blind set, else ""
}

// Shown returns the label the listener sees: the neutral one in a blind set.
func (c *Clip) Shown() string {
	if c.BlindLabel != "" {
		return c.BlindLabel
	}
	return c.Label
}

// Plot is a picture shown with a clip on the page.
type Plot struct {
	Title string `json:"title"`
	File  string `json:"file"`
}

// blindClip is what ab.json shows of a clip in a blind set.
type blindClip struct {
	Label        string       `json:"label"`
	File         string       `json:"file"`
	GainDB       report.Level `json:"gain_db"`
	LUFS         report.Level `json:"lufs"`
	TruePeakDBTP report.Level `json:"true_peak_dbtp"`
	PeakDBFS     report.Level `json:"peak_dbfs"`
	Flag         string       `json:"flag,omitempty"`
	Plots        []Plot       `json:"plots"`
}

// MarshalJSON writes the set; a blind set shows neutral labels only, and
// per clip just file, gain, loudness, peaks and plots.
func (s *Set) MarshalJSON() ([]byte, error) {
	type plain Set
	if !s.Blind {
		return json.Marshal((*plain)(s))
	}
	v := *s
	clips := make([]blindClip, len(s.Variants))
	for i, c := range s.Variants {
		clips[i] = blindClip{Label: c.Shown(), File: c.File, GainDB: c.GainDB, LUFS: c.LUFS,
			TruePeakDBTP: c.TruePeakDBTP, PeakDBFS: c.PeakDBFS, Flag: c.Flag, Plots: c.Plots}
	}
	return json.Marshal(struct {
		*plain
		Variants []blindClip `json:"variants"`
	}{(*plain)(&v), clips})
}
