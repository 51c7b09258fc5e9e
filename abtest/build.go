package abtest

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"time"

	"renderchain/chains"
	"renderchain/dsp/wavio"
	"renderchain/dsp/wdf"
	"renderchain/engine"
	"renderchain/render"
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

	Oversample  int     // 0: the chain's own setting or render.DefaultOversample
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

	Force bool // replace the clips of an earlier run in OutDir
	Jobs  int  // variants rendered at once; 0 means runtime.NumCPU()

	// Progress, if set, is called now and then with work done and total
	// (in frames), never from two goroutines at once.
	Progress func(done, total int64)
}

// Set describes a written A/B set; it is what ab.json holds. In a blind
// set, ab.json lists only neutral labels, files and loudness (see
// MarshalJSON); the Go value keeps everything.
type Set struct {
	Chain          string    `json:"chain"`
	ChainFile      string    `json:"chain_file"`
	Dry            Take      `json:"dry"`
	TargetLUFS     DB        `json:"target_lufs"` // the loudness every clip was brought to
	RequestedLUFS  DB        `json:"requested_target_lufs"`
	CeilingDBTP    DB        `json:"ceiling_dbtp"`
	CeilingLimited bool      `json:"ceiling_limited"` // the ceiling, not the request, set target_lufs
	SpreadLU       DB        `json:"spread_lu"`       // loudest minus quietest clip, as written
	Oversample     int       `json:"oversample"`
	Format         string    `json:"format"`
	Blind          bool      `json:"blind"`
	Variants       []Clip    `json:"variants"`
	Sequence       *Sequence `json:"sequence"` // null without a sequence file
	Page           string    `json:"page"`
	HearingCaution string    `json:"hearing_caution"`
	Warnings       []string  `json:"warnings"`

	Dir     string `json:"-"` // the folder written
	KeyFile string `json:"-"` // the key file written (blind sets)
	Key     *Key   `json:"-"`
}

// Take describes the dry take.
type Take struct {
	File       string  `json:"file"`
	Format     string  `json:"format"`
	SampleRate int     `json:"sample_rate"`
	Channels   int     `json:"channels"`
	Frames     int64   `json:"frames"`
	Seconds    float64 `json:"seconds"`
}

// Clip is one clip of a set: a variant or the bypass.
type Clip struct {
	Label        string       `json:"label"`
	File         string       `json:"file"`
	GainDB       DB           `json:"gain_db"`        // applied to the render (or the dry take)
	LUFS         DB           `json:"lufs"`           // of the file as written
	TruePeakDBTP DB           `json:"true_peak_dbtp"` // of the file as written
	PeakDBFS     DB           `json:"peak_dbfs"`
	LRA          DB           `json:"loudness_range_lu"` // EBU Tech 3342; null under 3.1 s
	Before       Levels       `json:"before_gain"`
	Bypass       bool         `json:"bypass"`
	ChainFile    string       `json:"chain_file,omitempty"` // another chain file the variant starts from
	Settings     []string     `json:"settings"`             // --set overrides; empty: the chain as written
	Solver       *SolverStats `json:"solver,omitempty"`
	Plots        []Plot       `json:"plots"`
	BlindLabel   string       `json:"-"` // the neutral label of a blind set, else ""
}

// Shown returns the label the listener sees: the neutral one in a blind set.
func (c *Clip) Shown() string {
	if c.BlindLabel != "" {
		return c.BlindLabel
	}
	return c.Label
}

// SolverStats are a variant's Newton statistics over all its channels.
type SolverStats struct {
	MeanIterations float64 `json:"mean_iterations"`
	MaxIterations  int     `json:"max_iterations"`
	Fallbacks      int64   `json:"fallbacks"`
	NonConverged   int64   `json:"nonconverged"`
}

// Plot is a picture shown with a clip on the page.
type Plot struct {
	Title string `json:"title"`
	File  string `json:"file"`
}

// blindClip is what ab.json shows of a clip in a blind set.
type blindClip struct {
	Label        string `json:"label"`
	File         string `json:"file"`
	GainDB       DB     `json:"gain_db"`
	LUFS         DB     `json:"lufs"`
	TruePeakDBTP DB     `json:"true_peak_dbtp"`
	PeakDBFS     DB     `json:"peak_dbfs"`
	Plots        []Plot `json:"plots"`
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
			TruePeakDBTP: c.TruePeakDBTP, PeakDBFS: c.PeakDBFS, Plots: c.Plots}
	}
	return json.Marshal(struct {
		*plain
		Variants []blindClip `json:"variants"`
	}{(*plain)(&v), clips})
}

// job is one clip on its way through Build.
type job struct {
	label  string
	bypass bool
	ch     *chains.Chain
	raw    string // pass 1 output (float64 WAV) or the dry take
	before Levels
	stats  wdf.Stats
	clip   Clip
}

// Build renders every variant and the bypass from one dry take, matches
// their loudness, writes the clips, the sequence file, ab.json and the
// listening page into opt.OutDir, and for a blind set the key file.
//
// Everything is built in a hidden temporary folder beside OutDir and moved
// into place only when all of it has been written: when OutDir does not
// exist it appears complete in one rename; otherwise the previous ab.json is
// removed first, the new files are renamed in one by one, ab.json last, and
// the files the previous ab.json named that the new set does not reuse are
// deleted. On any error nothing under OutDir changes. Files in OutDir that
// an earlier set did not write are left alone.
func Build(ctx context.Context, opt Options) (*Set, error) {
	o, err := normalise(opt)
	if err != nil {
		return nil, err
	}
	take, err := openTake(o.Dry)
	if err != nil {
		return nil, err
	}
	fs := float64(take.SampleRate)
	if need := int64(math.Ceil(0.4 * fs)); take.Frames < need {
		return nil, &ShortTakeError{File: o.Dry, Seconds: take.Seconds, Need: 0.4, Why: "one 400 ms loudness block"}
	}
	jobs, err := makeJobs(o)
	if err != nil {
		return nil, err
	}

	// Blind order and file names.
	order := make([]int, len(jobs)) // set position → job
	for i := range order {
		order[i] = i
	}
	var key *Key
	if o.Blind {
		order = Shuffle(len(jobs), o.Seed)
	}
	for pos, ji := range order {
		j := jobs[ji]
		if o.Blind {
			j.clip.BlindLabel = NeutralLabel(pos)
			j.clip.File = "clip-" + j.clip.BlindLabel + ".wav"
		} else {
			j.clip.File = fmt.Sprintf("%02d-%s.wav", pos+1, Slug(j.label))
		}
	}

	var plan seqPlan
	if !o.Sequence.Off {
		round, err := sequenceRound(o.Sequence.Order, jobs, order)
		if err != nil {
			return nil, err
		}
		if plan, err = planSequence(o.Sequence, fs, take.Frames, o.Dry, round); err != nil {
			return nil, err
		}
	}

	dir, err := filepath.Abs(o.OutDir)
	if err != nil {
		return nil, err
	}
	// An existing folder reached through a symbolic link: work beside the
	// folder itself, so the final renames stay on one file system.
	if real, err := filepath.EvalSymlinks(dir); err == nil {
		dir = real
	}
	stale, err := checkOutDir(dir, o.Force, o.Dry)
	if err != nil {
		return nil, err
	}
	names := []string{PageFile, ManifestFile}
	if !o.Sequence.Off {
		names = append(names, SequenceFile)
	}
	for _, j := range jobs {
		names = append(names, j.clip.File)
	}
	for _, n := range names {
		for _, keep := range []string{o.Dry, o.ChainPath} {
			if same, _ := wavio.SameFile(keep, filepath.Join(dir, n)); same && keep != "" {
				return nil, fmt.Errorf("%s: the set would write over %s; choose another --outdir", filepath.Join(o.OutDir, n), keep)
			}
		}
	}
	keyPath := ""
	if o.Blind {
		if keyPath, err = checkKeyPath(o.KeyPath, dir, o.Force); err != nil {
			return nil, err
		}
	}

	// Work space.
	parent := filepath.Dir(dir)
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return nil, err
	}
	tmp, err := os.MkdirTemp(parent, "."+filepath.Base(dir)+".abtmp-*")
	if err != nil {
		return nil, err
	}
	done := false
	defer func() {
		if !done {
			os.RemoveAll(tmp)
		}
	}()
	rawDir := filepath.Join(tmp, ".raw")
	if err := os.Mkdir(rawDir, 0o700); err != nil {
		return nil, err
	}

	renders := 0
	for _, j := range jobs {
		if !j.bypass {
			renders++
		}
	}
	seqFrames := int64(0)
	if !o.Sequence.Off {
		seqFrames = 2 * plan.frames()
	}
	pr := &progress{f: o.Progress, total: take.Frames*int64(renders+len(jobs)) + seqFrames}

	// Pass 1: render (or measure) every clip before gain.
	err = parallel(ctx, o.Jobs, len(jobs), func(ctx context.Context, i int) error {
		j := jobs[i]
		if j.bypass {
			j.raw = o.Dry
			return j.measureSource()
		}
		j.raw = filepath.Join(rawDir, fmt.Sprintf("%d.wav", i))
		return j.render(ctx, o.Dry, o.Oversample, pr)
	})
	if err != nil {
		return nil, err
	}

	// Match.
	m := make([]Measured, len(jobs))
	for i, j := range jobs {
		if !finite(float64(j.before.LUFS)) || !finite(float64(j.before.TruePeakDBTP)) {
			return nil, &SilentError{Label: j.label}
		}
		m[i] = Measured{LUFS: float64(j.before.LUFS), TruePeakDBTP: float64(j.before.TruePeakDBTP)}
	}
	common, gains, limited := Match(m, o.TargetLUFS, o.CeilingDBTP)
	if common < -70 {
		return nil, &ParamError{Param: "--ceiling", Value: fmt.Sprintf("%g dBTP", o.CeilingDBTP),
			Want: fmt.Sprintf("a ceiling the clips can be matched under (they would meet at %.1f LUFS, below the −70 LUFS gate)", common)}
	}
	format, bits := outFormat(o.Format, take)

	// Pass 2: gain, write the clips.
	err = parallel(ctx, o.Jobs, len(jobs), func(ctx context.Context, i int) error {
		return jobs[i].writeClip(ctx, common, gains[i], filepath.Join(tmp, jobs[i].clip.File), format, bits, take.Seconds < 3.1, pr)
	})
	if err != nil {
		return nil, err
	}
	os.RemoveAll(rawDir)

	set := &Set{
		Chain: o.Chain.Name, ChainFile: o.ChainPath, Dry: take,
		TargetLUFS: DB(common), RequestedLUFS: DB(o.TargetLUFS), CeilingDBTP: DB(o.CeilingDBTP),
		CeilingLimited: limited, Oversample: o.Oversample, Format: o.Format, Blind: o.Blind,
		Page: PageFile, HearingCaution: HearingCaution, Warnings: []string{}, Dir: dir,
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, ji := range order {
		c := jobs[ji].clip
		set.Variants = append(set.Variants, c)
		lo, hi = math.Min(lo, float64(c.LUFS)), math.Max(hi, float64(c.LUFS))
	}
	set.SpreadLU = DB(hi - lo)
	if limited {
		set.Warnings = append(set.Warnings, fmt.Sprintf("the %.1f dBTP ceiling keeps the clips at %.2f LUFS, below the %.1f LUFS asked for",
			o.CeilingDBTP, common, o.TargetLUFS))
	}
	for _, j := range jobs {
		if j.stats.NonConverged > 0 {
			set.Warnings = append(set.Warnings, fmt.Sprintf("%s: %d samples did not converge", j.clip.Shown(), j.stats.NonConverged))
		}
	}

	// Sequence.
	if !o.Sequence.Off {
		paths := make([]string, len(order))
		for pos, ji := range order {
			paths[pos] = filepath.Join(tmp, jobs[ji].clip.File)
		}
		if set.Sequence, err = buildSequence(plan, o.Sequence.Rounds, set, paths, tmp, format, bits, o.CeilingDBTP, pr); err != nil {
			return nil, err
		}
	}

	// Plots.
	if o.PlotDir != "" {
		for i := range set.Variants {
			if err := copyPlots(o.PlotDir, &set.Variants[i], tmp); err != nil {
				return nil, err
			}
		}
	}

	// Key, manifest, page.
	var keyTmp string
	if o.Blind {
		key = &Key{Note: "Key to the blind set in " + filepath.Base(dir) + ": keep it from the listener until they have chosen; " +
			"load it into index.html to reveal the labels.", Set: filepath.Base(dir), Seed: o.Seed}
		for _, c := range set.Variants {
			key.Clips = append(key.Clips, KeyClip{Blind: c.BlindLabel, File: c.File, Label: c.Label, Bypass: c.Bypass,
				ChainFile: c.ChainFile, Settings: c.Settings, GainDB: c.GainDB, TruePeak: c.TruePeakDBTP, Before: c.Before, LRA: c.LRA})
		}
		b, err := json.MarshalIndent(key, "", "  ")
		if err != nil {
			return nil, err
		}
		if keyTmp, err = writeTemp(filepath.Dir(keyPath), "."+filepath.Base(keyPath)+".*.tmp", append(b, '\n')); err != nil {
			return nil, err
		}
		defer func() {
			if !done {
				os.Remove(keyTmp)
			}
		}()
		set.KeyFile, set.Key = keyPath, key
	}
	b, err := json.MarshalIndent(set, "", "  ")
	if err != nil {
		return nil, err
	}
	if err := os.WriteFile(filepath.Join(tmp, ManifestFile), append(b, '\n'), 0o644); err != nil {
		return nil, err
	}
	page, err := Page(set)
	if err != nil {
		return nil, err
	}
	if err := os.WriteFile(filepath.Join(tmp, PageFile), page, 0o644); err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, errors.New("interrupted: nothing written")
	}

	// Commit.
	if err := commit(tmp, dir, stale); err != nil {
		return nil, err
	}
	done = true
	if keyTmp != "" {
		if err := os.Rename(keyTmp, keyPath); err != nil {
			os.Remove(keyTmp)
			return nil, fmt.Errorf("the set is in %s but its key could not be written: %w", o.OutDir, err)
		}
	}
	pr.finish()
	return set, nil
}

// normalise checks the options and fills in defaults.
func normalise(o Options) (Options, error) {
	if o.Chain == nil {
		return o, &ParamError{Param: "chain", Value: "none", Want: "a chain"}
	}
	if o.Dry == "" || o.OutDir == "" {
		return o, &ParamError{Param: "--in/--outdir", Value: `""`, Want: "a dry take and an output folder"}
	}
	if o.BypassLabel == "" {
		o.BypassLabel = DefaultBypassLabel
	}
	if o.Jobs <= 0 {
		o.Jobs = runtime.NumCPU()
	}
	os, err := engine.Oversample(o.Chain, o.Oversample)
	if err != nil {
		return o, err
	}
	o.Oversample = os
	if o.Format == "" {
		o.Format = render.FormatPCM24
	}
	switch o.Format {
	case render.FormatPCM16, render.FormatPCM24, render.FormatFloat32:
	default:
		return o, &ParamError{Param: "--format", Value: strconv.Quote(o.Format), Want: "pcm16, pcm24 or float32"}
	}
	if !(o.TargetLUFS >= -70 && o.TargetLUFS <= 0) {
		return o, &ParamError{Param: "--target-lufs", Value: fmt.Sprint(o.TargetLUFS), Want: "−70…0 LUFS"}
	}
	if !(o.CeilingDBTP >= -40 && o.CeilingDBTP <= 0) {
		return o, &ParamError{Param: "--ceiling", Value: fmt.Sprint(o.CeilingDBTP), Want: "−40…0 dBTP (a fixed-point file holds nothing above full scale)"}
	}
	if o.Blind && o.NoBypass && len(o.Variants) < 2 {
		return o, &ParamError{Param: "--blind", Value: "with one clip", Want: "at least two clips to compare"}
	}
	return o, nil
}

// openTake reads the dry take's header.
func openTake(path string) (Take, error) {
	f, err := wavio.Open(path)
	if err != nil {
		return Take{}, err
	}
	defer f.Close()
	fm := f.Format()
	t := Take{File: path, Format: fm.String(), SampleRate: fm.SampleRate, Channels: fm.Channels, Frames: f.Frames(),
		Seconds: float64(f.Frames()) / float64(fm.SampleRate)}
	switch {
	case fm.SampleRate < render.MinRate || fm.SampleRate > render.MaxRate:
		return t, fmt.Errorf("%s: sample rate %d Hz is outside %d–%d Hz", path, fm.SampleRate, render.MinRate, render.MaxRate)
	case fm.Channels > render.MaxChannels:
		return t, fmt.Errorf("%s: %d channels; renders take mono or stereo", path, fm.Channels)
	case f.Frames() == 0:
		return t, fmt.Errorf("%s: no audio frames", path)
	}
	return t, nil
}

// makeJobs resolves every variant's chain and adds the bypass.
func makeJobs(o Options) ([]*job, error) {
	vars := o.Variants
	if len(vars) == 0 {
		name := strings.TrimSuffix(filepath.Base(o.ChainPath), filepath.Ext(o.ChainPath))
		if name == "" || name == "." {
			name = "chain"
		}
		vars = []Variant{{Label: name, Settings: []string{}}}
	}
	seen := map[string]bool{}
	var jobs []*job
	for _, v := range vars {
		if err := checkLabel(v.Label); err != nil {
			return nil, &LabelError{Label: v.Label, Msg: err.Error()}
		}
		k := strings.ToLower(v.Label)
		if seen[k] {
			return nil, &LabelError{Label: v.Label, Msg: "given to two variants (labels are compared ignoring case)"}
		}
		seen[k] = true
		ch, file, err := v.resolve(o.Chain, o.ChainPath)
		if err != nil {
			return nil, err
		}
		settings := append([]string{}, v.Settings...)
		j := &job{label: v.Label, ch: ch,
			clip: Clip{Label: v.Label, Settings: settings, Plots: []Plot{}}}
		if v.ChainFile != "" {
			j.clip.ChainFile = file
		}
		jobs = append(jobs, j)
	}
	if !o.NoBypass {
		if seen[strings.ToLower(o.BypassLabel)] {
			return nil, &LabelError{Label: o.BypassLabel, Msg: "is the bypass clip's label too: rename the variant, or use --bypass-label or --no-bypass"}
		}
		jobs = append(jobs, &job{label: o.BypassLabel, bypass: true,
			clip: Clip{Label: o.BypassLabel, Bypass: true, Settings: []string{}, Plots: []Plot{}}})
	}
	return jobs, nil
}

// sequenceRound resolves the labels or 1-based positions of one round of the
// sequence to set positions. Empty: every clip once in set order.
func sequenceRound(spec []string, jobs []*job, order []int) ([]int, error) {
	pos := make([]int, len(order)) // job → set position
	for p, ji := range order {
		pos[ji] = p
	}
	if len(spec) == 0 {
		round := make([]int, len(order))
		for i := range round {
			round[i] = i
		}
		return round, nil
	}
	var round []int
	for _, s := range spec {
		s = strings.TrimSpace(s)
		found := -1
		for ji, j := range jobs {
			if strings.EqualFold(j.label, s) {
				found = ji
			}
		}
		if found < 0 {
			if n, err := strconv.Atoi(s); err == nil && n >= 1 && n <= len(jobs) {
				found = n - 1
			}
		}
		if found < 0 {
			return nil, &ParamError{Param: "--order", Value: strconv.Quote(s), Want: fmt.Sprintf("a clip's label or its number 1…%d", len(jobs))}
		}
		round = append(round, pos[found])
	}
	return round, nil
}

// outFormat returns the clip format and the rounding Gain.Bits for it.
func outFormat(name string, t Take) (wavio.Format, int) {
	f := wavio.Format{SampleRate: t.SampleRate, Channels: t.Channels, BitDepth: 24}
	switch name {
	case render.FormatPCM16:
		f.BitDepth = 16
	case render.FormatFloat32:
		f.BitDepth, f.Float = 32, true
		return f, -32
	}
	return f, f.BitDepth
}

// render runs the variant's chain over the dry take into a float64 WAV and
// measures it.
func (j *job) render(ctx context.Context, dry string, oversample int, pr *progress) error {
	fail := func(err error) error { return &VariantError{Label: j.label, Err: err} }
	eng, err := engine.Prepare(j.ch, oversample)
	if err != nil {
		return fail(err)
	}
	in, err := wavio.Open(dry)
	if err != nil {
		return err
	}
	defer in.Close()
	fm := in.Format()
	nc, fs := fm.Channels, float64(fm.SampleRate)
	f, err := os.Create(j.raw)
	if err != nil {
		return err
	}
	defer f.Close()
	w, err := wavio.NewWriter(f, wavio.Format{SampleRate: fm.SampleRate, Channels: nc, BitDepth: 64, Float: true})
	if err != nil {
		return err
	}
	meter, err := newMeter(fs, nc)
	if err != nil {
		return err
	}
	var last int64
	info, err := eng.Stream(ctx, in, fs, nc, nil, func(y []float64) error {
		meter.Write(y)
		if err := w.Write(y); err != nil {
			return fail(fmt.Errorf("the circuit's output: %w", err))
		}
		return nil
	}, func(done int64) {
		pr.add(done - last)
		last = done
	})
	if err != nil {
		if errors.Is(err, engine.ErrInterrupted) {
			return ctx.Err()
		}
		var ve *VariantError
		if errors.As(err, &ve) {
			return err
		}
		return fail(err)
	}
	if err := w.Close(); err != nil {
		return err
	}
	if err := meter.Err(); err != nil {
		return fail(err)
	}
	j.stats.Add(info.Stats)
	j.before = levelsOf(meter)
	j.clip.Solver = &SolverStats{MeanIterations: math.Round(j.stats.MeanIterations()*1000) / 1000,
		MaxIterations: j.stats.MaxIterations, Fallbacks: j.stats.Fallbacks, NonConverged: j.stats.NonConverged}
	return f.Close()
}

// measureSource measures the bypass clip's source, the dry take.
func (j *job) measureSource() error {
	lv, _, err := measureFile(j.raw)
	j.before = lv
	return err
}

// matchTolerance is how close, in LU, a written clip must come to the
// common loudness before writeClip stops correcting its gain. A gain moves
// every block's loudness by the same amount, so one pass suffices unless a
// block crosses the −70 LUFS absolute gate.
const matchTolerance = 0.001

// writeClip applies the gain to the clip's source and writes the clip.
//
// short marks a take too short for two 3 s short-term windows (3.1 s),
// whose loudness range is undefined.
func (j *job) writeClip(ctx context.Context, common, gain float64, path string, f wavio.Format, bits int, short bool, pr *progress) error {
	var lv Levels
	var lra float64
	for try := 0; try < 3; try++ {
		var err error
		if lv, lra, err = gainFile(ctx, j.raw, path, f, Gain{Factor: fromDB(gain), Bits: bits}, pr); err != nil {
			return err
		}
		miss := common - float64(lv.LUFS)
		if !finite(miss) || math.Abs(miss) <= matchTolerance {
			break
		}
		gain += miss
	}
	j.clip.GainDB, j.clip.Before = DB(gain), j.before
	j.clip.LUFS, j.clip.TruePeakDBTP, j.clip.PeakDBFS = lv.LUFS, lv.TruePeakDBTP, lv.PeakDBFS
	j.clip.LRA = DB(lra)
	if short {
		j.clip.LRA = DB(math.NaN())
	}
	return nil
}

// gainFile streams src through g into a new WAV file at dst and measures
// what it wrote.
func gainFile(ctx context.Context, src, dst string, f wavio.Format, g Gain, pr *progress) (Levels, float64, error) {
	in, err := wavio.Open(src)
	if err != nil {
		return Levels{}, 0, err
	}
	defer in.Close()
	out, err := os.Create(dst)
	if err != nil {
		return Levels{}, 0, err
	}
	defer out.Close()
	w, err := wavio.NewWriter(out, f)
	if err != nil {
		return Levels{}, 0, err
	}
	m, err := newMeter(float64(f.SampleRate), f.Channels)
	if err != nil {
		return Levels{}, 0, err
	}
	buf := make([]float64, 4096*f.Channels)
	for {
		if err := ctx.Err(); err != nil {
			return Levels{}, 0, err
		}
		n, rerr := in.Read(buf)
		if n > 0 {
			g.Process(buf[:n], buf[:n])
			m.Write(buf[:n])
			if err := w.Write(buf[:n]); err != nil {
				return Levels{}, 0, err
			}
			pr.add(int64(n / f.Channels))
		}
		if rerr == io.EOF {
			break
		}
		if rerr != nil {
			return Levels{}, 0, rerr
		}
	}
	if err := w.Close(); err != nil {
		return Levels{}, 0, err
	}
	if w.Clipped() > 0 {
		return Levels{}, 0, fmt.Errorf("%s: %d samples clipped after the gain (internal error: the ceiling should prevent this)", base(dst), w.Clipped())
	}
	return levelsOf(m), m.LoudnessRange(), out.Close()
}

// buildSequence writes the sequence file into dir.
func buildSequence(p seqPlan, rounds int, set *Set, paths []string, dir string, f wavio.Format, bits int, ceiling float64, pr *progress) (*Sequence, error) {
	nc := f.Channels
	fs := float64(f.SampleRate)
	// First pass: the true peak of the sequence at unity gain, with the
	// rounding the file will get.
	m, err := newMeter(fs, nc)
	if err != nil {
		return nil, err
	}
	unity := Gain{Factor: 1, Bits: bits}
	err = writeSequence(p, paths, nc, func(b []float64) error {
		unity.Process(b, b)
		m.Write(b)
		pr.add(int64(len(b) / nc))
		return nil
	})
	if err != nil {
		return nil, err
	}
	gainDB := 0.0
	if tp := m.TruePeak(); tp > ceiling-CeilingMargin {
		gainDB = ceiling - CeilingMargin - tp
	}
	// Second pass: write.
	out, err := os.Create(filepath.Join(dir, SequenceFile))
	if err != nil {
		return nil, err
	}
	defer out.Close()
	w, err := wavio.NewWriter(out, f)
	if err != nil {
		return nil, err
	}
	m2, _ := newMeter(fs, nc)
	g := Gain{Factor: fromDB(gainDB), Bits: bits}
	err = writeSequence(p, paths, nc, func(b []float64) error {
		g.Process(b, b)
		m2.Write(b)
		pr.add(int64(len(b) / nc))
		return w.Write(b)
	})
	if err != nil {
		return nil, err
	}
	if err := w.Close(); err != nil {
		return nil, err
	}
	if err := out.Close(); err != nil {
		return nil, err
	}
	s := &Sequence{File: SequenceFile, Rounds: rounds, SegmentFrames: p.S, CrossfadeFrames: p.F,
		PhraseStartFrame: p.P, Frames: w.Frames(), SegmentSeconds: float64(p.S) / fs, CrossfadeSeconds: float64(p.F) / fs,
		StartSeconds: float64(p.P) / fs, GainDB: DB(gainDB), TruePeakDBTP: DB(m2.TruePeak())}
	for _, ci := range p.clips[:len(p.clips)/rounds] {
		s.Order = append(s.Order, set.Variants[ci].Shown())
	}
	for k, ci := range p.clips {
		c := &set.Variants[ci]
		s.Segments = append(s.Segments, Segment{Label: c.Shown(), File: c.File, StartFrame: int64(k) * p.S, StartS: float64(int64(k)*p.S) / fs})
	}
	return s, nil
}

// copyPlots copies the variant's PNG plots from dir into the set.
func copyPlots(dir string, c *Clip, tmp string) error {
	slug := Slug(c.Label)
	matches, err := filepath.Glob(filepath.Join(dir, slug+".*.png"))
	if err != nil {
		return err
	}
	sort.Strings(matches)
	stem := strings.TrimSuffix(c.File, ".wav")
	for _, src := range matches {
		title := strings.TrimSuffix(strings.TrimPrefix(filepath.Base(src), slug+"."), ".png")
		if title == "" || strings.ContainsAny(title, `/\`) {
			continue
		}
		name := stem + "." + Slug(title) + ".png"
		b, err := os.ReadFile(src)
		if err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(tmp, name), b, 0o644); err != nil {
			return err
		}
		c.Plots = append(c.Plots, Plot{Title: title, File: name})
	}
	return nil
}

// Slug turns a label into a file-name stem: lower-case ASCII letters and
// digits, other runs of characters replaced by one hyphen, at most 40
// characters; "clip" if nothing is left.
func Slug(label string) string {
	var b strings.Builder
	dash := false
	for _, r := range strings.ToLower(label) {
		if (r >= 'a' && r <= 'z') || (r >= '0' && r <= '9') {
			if dash && b.Len() > 0 {
				b.WriteByte('-')
			}
			dash = false
			b.WriteRune(r)
			if b.Len() >= 40 {
				break
			}
			continue
		}
		dash = true
	}
	if b.Len() == 0 {
		return "clip"
	}
	return b.String()
}

// checkOutDir looks for an earlier set in dir. It returns the files of the
// earlier set that a new one replaces or retires (for commit), or an
// *ExistsError when there are clips there and force is off.
func checkOutDir(dir string, force bool, dry string) ([]string, error) {
	st, err := os.Stat(dir)
	if errors.Is(err, os.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	if !st.IsDir() {
		return nil, fmt.Errorf("--outdir %s is a file, not a folder", dir)
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var found []string
	for _, e := range entries {
		n := e.Name()
		if n == ManifestFile || n == PageFile || strings.EqualFold(filepath.Ext(n), ".wav") {
			if same, _ := wavio.SameFile(filepath.Join(dir, n), dry); same {
				continue
			}
			found = append(found, n)
		}
	}
	if len(found) == 0 {
		return nil, nil
	}
	if !force {
		sort.Strings(found)
		return nil, &ExistsError{Dir: dir, Files: found}
	}
	// The earlier set's own files: what its ab.json names, and the fixed names.
	stale := []string{ManifestFile, PageFile, SequenceFile}
	var old struct {
		Variants []struct {
			File  string `json:"file"`
			Plots []Plot `json:"plots"`
		} `json:"variants"`
	}
	if b, err := os.ReadFile(filepath.Join(dir, ManifestFile)); err == nil && json.Unmarshal(b, &old) == nil {
		for _, v := range old.Variants {
			stale = append(stale, v.File)
			for _, p := range v.Plots {
				stale = append(stale, p.File)
			}
		}
	}
	var keep []string
	for _, s := range stale {
		if s == "" || s != filepath.Base(s) {
			continue // only plain names inside dir
		}
		if same, _ := wavio.SameFile(filepath.Join(dir, s), dry); same {
			continue
		}
		keep = append(keep, s)
	}
	return keep, nil
}

// checkKeyPath resolves the key file's path and checks it lies outside the
// set's folder.
func checkKeyPath(p, dir string, force bool) (string, error) {
	if p == "" {
		p = dir + "-key.json"
	}
	abs, err := filepath.Abs(p)
	if err != nil {
		return "", err
	}
	if rel, err := filepath.Rel(dir, abs); err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return "", &ParamError{Param: "--key", Value: p, Want: "a file outside --outdir (the listener gets that folder)"}
	}
	if st, err := os.Stat(abs); err == nil {
		if st.IsDir() {
			return "", fmt.Errorf("--key %s is a folder", p)
		}
		if !force {
			return "", &ExistsError{Dir: filepath.Dir(abs), Files: []string{filepath.Base(abs)}}
		}
	}
	return abs, nil
}

// writeTemp writes b to a new temporary file in dir and returns its name.
func writeTemp(dir, pattern string, b []byte) (string, error) {
	f, err := os.CreateTemp(dir, pattern)
	if err != nil {
		return "", err
	}
	if _, err := f.Write(b); err != nil {
		f.Close()
		os.Remove(f.Name())
		return "", err
	}
	if err := f.Close(); err != nil {
		os.Remove(f.Name())
		return "", err
	}
	return f.Name(), nil
}

// commit moves the finished set from tmp into dir (see Build).
func commit(tmp, dir string, stale []string) error {
	if err := os.Chmod(tmp, 0o755); err != nil {
		return err
	}
	if _, err := os.Stat(dir); errors.Is(err, os.ErrNotExist) {
		return os.Rename(tmp, dir)
	}
	entries, err := os.ReadDir(tmp)
	if err != nil {
		return err
	}
	if err := os.Remove(filepath.Join(dir, ManifestFile)); err != nil && !errors.Is(err, os.ErrNotExist) {
		return err
	}
	written := map[string]bool{}
	for _, e := range entries {
		if e.Name() == ManifestFile {
			continue
		}
		if err := os.Rename(filepath.Join(tmp, e.Name()), filepath.Join(dir, e.Name())); err != nil {
			return fmt.Errorf("moving the set into %s: %w", dir, err)
		}
		written[e.Name()] = true
	}
	if err := os.Rename(filepath.Join(tmp, ManifestFile), filepath.Join(dir, ManifestFile)); err != nil {
		return fmt.Errorf("moving the set into %s: %w", dir, err)
	}
	written[ManifestFile] = true
	for _, s := range stale {
		if !written[s] {
			os.Remove(filepath.Join(dir, s))
		}
	}
	return os.Remove(tmp)
}

// parallel runs fn(i) for i < n on up to jobs goroutines; the first error
// cancels the rest and is returned.
func parallel(ctx context.Context, jobs, n int, fn func(context.Context, int) error) error {
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	next := make(chan int)
	var wg sync.WaitGroup
	var once sync.Once
	var first error
	for w := 0; w < min(jobs, n); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				if err := fn(ctx, i); err != nil {
					once.Do(func() { first = err; cancel() })
				}
			}
		}()
	}
feed:
	for i := 0; i < n; i++ {
		select {
		case next <- i:
		case <-ctx.Done():
			break feed
		}
	}
	close(next)
	wg.Wait()
	if (first == nil && ctx.Err() != nil) || errors.Is(first, context.Canceled) {
		first = errors.New("interrupted: nothing written")
	}
	return first
}

// progress serialises and throttles progress reports.
type progress struct {
	mu          sync.Mutex
	f           func(done, total int64)
	done, total int64
	last        time.Time
}

func (p *progress) add(n int64) {
	if p == nil || p.f == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.done = min(p.done+n, p.total)
	if time.Since(p.last) >= 100*time.Millisecond {
		p.last = time.Now()
		p.f(p.done, p.total)
	}
}

func (p *progress) finish() {
	if p == nil || p.f == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.f(p.total, p.total)
}
