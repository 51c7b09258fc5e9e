package abtest

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"time"

	"renderchain/analyze"
	"renderchain/dsp/wavio"
	"renderchain/engine"
	"renderchain/outputs"
	"renderchain/parallel"
	"renderchain/render"
	"renderchain/report"
)

// builder holds an A/B set on its way through Build, step by step.
type builder struct {
	o     Options
	take  Take
	jobs  []*job
	order []int // set position → job
	plan  seqPlan

	dir, tmp, rawDir, keyPath string
	stale                     []string // files of an earlier set to retire
	pr                        *progress

	outs *outputs.Set  // every path the set reads and writes (Options.Outputs or its own)
	key  *outputs.File // the key of a blind set
}

// Build renders every variant and the bypass from one dry take, matches
// their loudness, writes the clips, the sequence file, ab.json and the
// listening page into opt.OutDir, and for a blind set the key file.
//
// Every path is checked before any work (an outputs.Set: OutDir and the
// key file not the take, the chain file or a variant's chain file, by
// device and inode; their folders writable). Everything is built in a
// hidden work folder and committed, key included, all or none, only when
// all of it has been written: when OutDir does not exist it appears
// complete in one rename; otherwise the new files are moved in one by one
// and the files the previous ab.json named that the new set does not reuse
// are retired, every replaced file kept until all are in place
// (outputs.Set.Commit). On any error or cancellation nothing under OutDir
// or at the key's path changes. Files in OutDir that an earlier set did
// not write are left alone.
//
// The steps: plan (options, take, variants, blind order, sequence), a
// check of every path and a work folder, pass 1 (render every variant, measure every
// clip), the loudness match, pass 2 (gain and write every clip), the set's
// description with its sequence file and plots, the key, ab.json and the
// page, and the commit.
func Build(ctx context.Context, opt Options) (*Set, error) {
	b, err := planSet(opt)
	if err != nil {
		return nil, err
	}
	if err := b.workspace(); err != nil {
		return nil, err
	}
	defer b.outs.Abort()
	if err := b.renderAll(ctx); err != nil {
		return nil, err
	}
	common, gains, limited, err := b.match()
	if err != nil {
		return nil, err
	}
	if err := b.writeClips(ctx, common, gains); err != nil {
		return nil, err
	}
	set := b.describe(common, limited)
	if err := b.addSequence(set); err != nil {
		return nil, err
	}
	if err := b.addPlots(set); err != nil {
		return nil, err
	}
	if err := b.addPictures(ctx, set); err != nil {
		return nil, err
	}
	if err := b.writeDescriptions(ctx, set); err != nil {
		return nil, err
	}
	if err := b.commit(set); err != nil {
		return nil, err
	}
	return set, nil
}

// planSet checks the options, reads the take, resolves every variant, draws
// the blind order and names the files, and plans the sequence.
func planSet(opt Options) (*builder, error) {
	o, err := normalise(opt)
	if err != nil {
		return nil, err
	}
	b := &builder{o: o}
	if b.take, err = openTake(o.Dry); err != nil {
		return nil, err
	}
	if need := int64(math.Ceil(0.4 * float64(b.take.SampleRate))); b.take.Frames < need {
		return nil, &ShortTakeError{File: o.Dry, Seconds: b.take.Seconds, Need: 0.4, Why: "one 400 ms loudness block"}
	}
	if o.Pictures.On {
		if b.o.Pictures, err = checkPictures(o.Pictures, float64(b.take.SampleRate)); err != nil {
			return nil, err
		}
	}
	if b.jobs, err = makeJobs(o); err != nil {
		return nil, err
	}
	b.order = make([]int, len(b.jobs))
	for i := range b.order {
		b.order[i] = i
	}
	if o.Blind {
		b.order = Shuffle(len(b.jobs), o.Seed)
	}
	for pos, ji := range b.order {
		j := b.jobs[ji]
		if o.Blind {
			j.clip.BlindLabel = NeutralLabel(pos)
			j.clip.File = "clip-" + j.clip.BlindLabel + ".wav"
		} else {
			j.clip.File = fmt.Sprintf("%02d-%s.wav", pos+1, Slug(j.label))
		}
	}
	if !o.Sequence.Off {
		round, err := sequenceRound(o.Sequence.Order, b.jobs, b.order)
		if err != nil {
			return nil, err
		}
		if b.plan, err = planSequence(o.Sequence, float64(b.take.SampleRate), b.take.Frames, o.Dry, round); err != nil {
			return nil, err
		}
	}
	return b, nil
}

// workspace checks the output folder and the key file, makes sure no file
// of the set would land on the take or the chain file, and creates the
// hidden folder the set is built in.
func (b *builder) workspace() error {
	o := b.o
	dir, err := filepath.Abs(o.OutDir)
	if err != nil {
		return err
	}
	// An existing folder reached through a symbolic link: work beside the
	// folder itself, so the final renames stay on one file system.
	if real, err := filepath.EvalSymlinks(dir); err == nil {
		dir = real
	}
	b.dir = dir
	if b.stale, err = checkOutDir(dir, o.Force, o.Dry); err != nil {
		return err
	}
	names := []string{PageFile, ManifestFile}
	if !o.Sequence.Off {
		names = append(names, SequenceFile)
	}
	for _, j := range b.jobs {
		names = append(names, j.clip.File)
	}
	for _, n := range names {
		for _, in := range []struct{ role, path string }{{"input", o.Dry}, {"chain", o.ChainPath}} {
			if same, _ := wavio.SameFile(in.path, filepath.Join(dir, n)); same && in.path != "" {
				return &outputs.PathError{Role: "output", Path: filepath.Join(o.OutDir, n), Kind: outputs.ErrSameAsInput,
					Other: in.role, OtherPath: in.path, Detail: "the set would write over it; choose another output folder"}
			}
		}
	}
	if o.Blind {
		if b.keyPath, err = checkKeyPath(o.KeyPath, dir, o.Force); err != nil {
			return err
		}
	}
	b.outs = o.Outputs
	if b.outs == nil {
		b.outs = outputs.New()
	}
	b.outs.Input("input", o.Dry)
	if o.ChainPath != "" {
		b.outs.Input("chain", o.ChainPath)
	}
	for _, j := range b.jobs {
		if j.clip.ChainFile != "" {
			b.outs.Input("variant", j.clip.ChainFile)
		}
	}
	out := b.outs.Dir("output", o.OutDir)
	if o.Blind {
		b.key = b.outs.File("key", b.keyPath)
	}
	if err := b.outs.Check(); err != nil {
		return err
	}
	out.Replace(b.stale...)
	b.tmp = out.Work()
	b.rawDir = filepath.Join(b.tmp, ".raw")
	if err := os.Mkdir(b.rawDir, 0o700); err != nil {
		b.outs.Abort()
		return err
	}
	renders := 0
	for _, j := range b.jobs {
		if !j.bypass {
			renders++
		}
	}
	seqFrames := int64(0)
	if !o.Sequence.Off {
		seqFrames = 2 * b.plan.frames()
	}
	b.pr = &progress{f: o.Progress, total: b.take.Frames*int64(renders+len(b.jobs)) + seqFrames}
	return nil
}

// each runs fn for every job on the worker pool; an interruption is
// reported as such.
func (b *builder) each(ctx context.Context, fn func(context.Context, *job) error) error {
	err := parallel.For(ctx, len(b.jobs), b.o.Jobs, func(ctx context.Context, i int) error { return fn(ctx, b.jobs[i]) })
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return errors.New("interrupted: nothing written")
	}
	return err
}

// renderAll is pass 1: every variant rendered (or the dry take measured)
// before any gain, into a float64 work file, so nothing clips yet.
func (b *builder) renderAll(ctx context.Context) error {
	n := 0
	for _, j := range b.jobs {
		if !j.bypass {
			j.raw = filepath.Join(b.rawDir, fmt.Sprintf("%d.wav", n))
			n++
		}
	}
	return b.each(ctx, func(ctx context.Context, j *job) error {
		if j.bypass {
			j.raw = b.o.Dry
			return j.measureSource()
		}
		return j.render(ctx, b.o.Dry, b.o.Oversample, b.pr)
	})
}

// match finds the common loudness and each clip's gain (Match).
func (b *builder) match() (common float64, gains []float64, limited bool, err error) {
	m := make([]Measured, len(b.jobs))
	for i, j := range b.jobs {
		if !report.Finite(float64(j.before.LUFS)) || !report.Finite(float64(j.before.TruePeakDBTP)) {
			return 0, nil, false, &SilentError{Label: j.label}
		}
		m[i] = Measured{LUFS: float64(j.before.LUFS), TruePeakDBTP: float64(j.before.TruePeakDBTP)}
	}
	common, gains, limited = Match(m, b.o.TargetLUFS, b.o.CeilingDBTP)
	b.flagQuiet(gains)
	if common < -70 {
		return 0, nil, false, paramErr("ceiling", fmt.Sprintf("%g dBTP", b.o.CeilingDBTP),
			fmt.Sprintf("a ceiling the clips can be matched under (they would meet at %.1f LUFS, below the −70 LUFS gate)", common))
	}
	return common, gains, limited, nil
}

// flagQuiet compares each variant's gain with the others'
// (GainOverOthers) and flags one that needs more than QuieterLimitDB.
func (b *builder) flagQuiet(gains []float64) {
	bypass := make([]bool, len(b.jobs))
	for i, j := range b.jobs {
		bypass[i] = j.bypass
	}
	for i, over := range GainOverOthers(gains, bypass) {
		c := &b.jobs[i].clip
		c.GainOverOthersDB = report.Level(over)
		c.Warnings = report.Warnings{}
		if over > QuieterLimitDB {
			c.Flag = MuchQuieter
			c.Warnings.Add("%s", MuchQuieter)
		}
		c.Warnings.Merge(b.jobs[i].chainWarnings)
	}
}

// writeClips is pass 2: every clip's source times its gain, written in the
// set's format and measured as written.
func (b *builder) writeClips(ctx context.Context, common float64, gains []float64) error {
	format, bits := outFormat(b.o.Format, b.take)
	index := make(map[*job]int, len(b.jobs))
	for i, j := range b.jobs {
		index[j] = i
	}
	err := b.each(ctx, func(ctx context.Context, j *job) error {
		return j.writeClip(ctx, common, gains[index[j]], filepath.Join(b.tmp, j.clip.File), format, bits, b.take.Seconds < 3.1, b.pr)
	})
	if err != nil {
		return err
	}
	return os.RemoveAll(b.rawDir)
}

// describe assembles the set's description from the written clips.
func (b *builder) describe(common float64, limited bool) *Set {
	o := b.o
	set := &Set{
		Chain: o.Chain.Name, ChainFile: o.ChainPath, Dry: b.take,
		TargetLUFS: report.Level(common), RequestedLUFS: report.Level(o.TargetLUFS), CeilingDBTP: report.Level(o.CeilingDBTP),
		CeilingLimited: limited, Oversample: o.Oversample, Format: o.Format, Blind: o.Blind,
		Page: PageFile, HearingCaution: HearingCaution, Warnings: report.Warnings{}, Dir: b.dir, Pictures: []Plot{},
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, ji := range b.order {
		c := b.jobs[ji].clip
		set.Variants = append(set.Variants, c)
		lo, hi = math.Min(lo, float64(c.LUFS)), math.Max(hi, float64(c.LUFS))
	}
	set.SpreadLU = report.Level(hi - lo)
	for _, c := range set.Variants {
		if c.Flag != "" {
			set.Warnings.Add("%s: %s (its match gain, %+.1f dB, is %.1f dB above the others' median; flagged above %g dB)",
				c.Shown(), c.Flag, float64(c.GainDB), float64(c.GainOverOthersDB), QuieterLimitDB)
		}
	}
	if limited {
		set.Warnings.Add("the %.1f dBTP ceiling keeps the clips at %.2f LUFS, below the %.1f LUFS asked for (the peaks of %s set it)",
			o.CeilingDBTP, common, o.TargetLUFS, b.limiter().clip.Shown())
	}
	if !o.Blind {
		// A blind set keeps these to its key: they name parts and settings.
		var labels []string
		var lists []report.Warnings
		for _, j := range b.jobs {
			if !j.bypass {
				labels, lists = append(labels, j.clip.Label), append(lists, j.chainWarnings)
			}
		}
		set.Warnings.Merge(report.Combine(labels, lists))
	}
	var overs int64
	var readWarn []string
	for _, j := range b.jobs {
		if !j.bypass {
			overs, readWarn = max(overs, j.overs), j.readWarn
		}
	}
	set.Warnings.Merge(report.InputNotes(o.Dry, overs, readWarn))
	for _, j := range b.jobs {
		if j.stats.NonConverged > 0 {
			set.Warnings.Add("%s: %d samples did not converge", j.clip.Shown(), j.stats.NonConverged)
		}
	}
	return set
}

// limiter returns the clip whose true peak decides a ceiling-limited
// common loudness: the least room between its loudness and its true peak.
func (b *builder) limiter() *job {
	var worst *job
	for _, j := range b.jobs {
		if worst == nil || j.before.TruePeakDBTP-j.before.LUFS > worst.before.TruePeakDBTP-worst.before.LUFS {
			worst = j
		}
	}
	return worst
}

// addSequence writes the sequence file into the workspace.
func (b *builder) addSequence(set *Set) error {
	if b.o.Sequence.Off {
		return nil
	}
	paths := make([]string, len(b.order))
	for pos, ji := range b.order {
		paths[pos] = filepath.Join(b.tmp, b.jobs[ji].clip.File)
	}
	format, bits := outFormat(b.o.Format, b.take)
	var err error
	set.Sequence, err = buildSequence(b.plan, b.o.Sequence.Rounds, set, paths, b.tmp, format, bits, b.o.CeilingDBTP, b.pr)
	return err
}

// addPlots copies the variants' plots into the workspace.
func (b *builder) addPlots(set *Set) error {
	if b.o.PlotDir == "" {
		return nil
	}
	for i := range set.Variants {
		if err := copyPlots(b.o.PlotDir, &set.Variants[i], b.tmp); err != nil {
			return err
		}
	}
	return nil
}

// writeDescriptions writes the key of a blind set (under a temporary name
// beside its final one), ab.json and the page.
func (b *builder) writeDescriptions(ctx context.Context, set *Set) error {
	if b.o.Blind {
		key := &Key{Note: "Key to the blind set in " + filepath.Base(b.dir) + ": keep it from the listener until they have chosen; " +
			"load it into index.html to reveal the labels.", Set: filepath.Base(b.dir), Seed: b.o.Seed}
		for _, c := range set.Variants {
			key.Clips = append(key.Clips, KeyClip{Blind: c.BlindLabel, File: c.File, Label: c.Label, Bypass: c.Bypass,
				ChainFile: c.ChainFile, Settings: c.Settings, GainDB: c.GainDB, TruePeak: c.TruePeakDBTP, Before: c.Before, LRA: c.LRA,
				Flag: c.Flag, Warnings: c.Warnings})
		}
		kb, err := json.MarshalIndent(key, "", "  ")
		if err != nil {
			return err
		}
		if _, err := b.key.Write(append(kb, '\n')); err != nil {
			return err
		}
		set.KeyFile, set.Key = b.keyPath, key
	}
	mb, err := json.MarshalIndent(set, "", "  ")
	if err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(b.tmp, ManifestFile), append(mb, '\n'), 0o644); err != nil {
		return err
	}
	page, err := Page(set)
	if err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(b.tmp, PageFile), page, 0o644); err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return errors.New("interrupted: nothing written")
	}
	return nil
}

// commit moves the set into its folder and the key into place, all or
// none (outputs.Set.Commit).
func (b *builder) commit(set *Set) error {
	if err := b.outs.Commit(); err != nil {
		return err
	}
	b.pr.finish()
	return nil
}

// normalise checks the options and fills in defaults.
func normalise(o Options) (Options, error) {
	if o.Chain == nil {
		return o, paramErr("chain", "none", "a chain")
	}
	if o.Dry == "" || o.OutDir == "" {
		return o, paramErr("input", "", "a dry take and an output folder")
	}
	if o.BypassLabel == "" {
		o.BypassLabel = DefaultBypassLabel
	}
	o.Jobs = parallel.Workers(o.Jobs)
	os, err := engine.Oversample(o.Chain, o.Oversample)
	if err != nil {
		return o, err
	}
	o.Oversample = os
	if o.Format == "" {
		o.Format = render.FormatPCM24
	}
	if _, err := render.OutputFormat(o.Format, render.MinRate, 1); err != nil {
		return o, err
	}
	if !(o.TargetLUFS >= -70 && o.TargetLUFS <= 0) {
		return o, paramErr("target_lufs", fmt.Sprint(o.TargetLUFS), "−70…0 LUFS")
	}
	if !(o.CeilingDBTP >= -40 && o.CeilingDBTP <= 0) {
		return o, paramErr("ceiling", fmt.Sprint(o.CeilingDBTP), "−40…0 dBTP (a fixed-point file holds nothing above full scale)")
	}
	if o.Blind && o.NoBypass && len(o.Variants) < 2 {
		return o, paramErr("blind", "with one clip", "at least two clips to compare")
	}
	return o, nil
}

// openTake reads the dry take's header and checks it is one a render
// takes (render.CheckInput).
func openTake(path string) (Take, error) {
	f, err := render.CheckInput(path)
	if err != nil {
		return Take{}, err
	}
	defer f.Close()
	return report.WAVOf(path, f.Format(), f.Frames()), nil
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
			clip: Clip{Label: v.Label, Settings: settings, Plots: []Plot{}, SupplyV: ch.Supply, Warnings: report.Warnings{}}}
		if v.ChainFile != "" {
			j.clip.ChainFile = file
		}
		jobs = append(jobs, j)
	}
	if !o.NoBypass {
		if seen[strings.ToLower(o.BypassLabel)] {
			return nil, &LabelError{Label: o.BypassLabel, Msg: "is the bypass clip's label too: rename the variant or the bypass clip, or leave the bypass out"}
		}
		jobs = append(jobs, &job{label: o.BypassLabel, bypass: true,
			clip: Clip{Label: o.BypassLabel, Bypass: true, Settings: []string{}, Plots: []Plot{}, Warnings: report.Warnings{}}})
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
			return nil, paramErr("order", s, fmt.Sprintf("a clip's label or its number 1…%d", len(jobs)))
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

// buildSequence writes the sequence file into dir.
func buildSequence(p seqPlan, rounds int, set *Set, paths []string, dir string, f wavio.Format, bits int, ceiling float64, pr *progress) (*Sequence, error) {
	nc := f.Channels
	fs := float64(f.SampleRate)
	// First pass: the true peak of the sequence at unity gain, with the
	// rounding the file will get.
	m, err := analyze.NewMeter(fs, nc)
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
	m2, _ := analyze.NewMeter(fs, nc)
	g := Gain{Factor: report.FromDB(gainDB), Bits: bits}
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
		StartSeconds: float64(p.P) / fs, GainDB: report.Level(gainDB), TruePeakDBTP: report.Level(m2.TruePeak())}
	for _, ci := range p.clips[:len(p.clips)/rounds] {
		s.Order = append(s.Order, set.Variants[ci].Shown())
	}
	for k, ci := range p.clips {
		c := &set.Variants[ci]
		s.Segments = append(s.Segments, Segment{Label: c.Shown(), File: c.File, StartFrame: int64(k) * p.S, StartS: float64(int64(k)*p.S) / fs})
	}
	return s, nil
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
