package abtest

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/engine"
	"renderchain/models"
	"renderchain/render"
)

// manifest is the part of ab.json that the project's interface fixes,
// read back from the file as an outside reader would.
type manifest struct {
	TargetLUFS  *float64 `json:"target_lufs"`
	CeilingDBTP float64  `json:"ceiling_dbtp"`
	Limited     bool     `json:"ceiling_limited"`
	Variants    []struct {
		Label        string    `json:"label"`
		File         string    `json:"file"`
		GainDB       *float64  `json:"gain_db"`
		LUFS         *float64  `json:"lufs"`
		TruePeakDBTP *float64  `json:"true_peak_dbtp"`
		Settings     *[]string `json:"settings"`
		Bypass       *bool     `json:"bypass"`
	} `json:"variants"`
	Sequence *Sequence `json:"sequence"`
}

func readManifest(t *testing.T, dir string) manifest {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, ManifestFile))
	if err != nil {
		t.Fatal(err)
	}
	var m manifest
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if m.TargetLUFS == nil || len(m.Variants) == 0 {
		t.Fatalf("ab.json lacks target_lufs or variants: %s", b)
	}
	for _, v := range m.Variants {
		if v.Label == "" || v.File == "" || v.GainDB == nil || v.LUFS == nil {
			t.Fatalf("ab.json variant lacks label, file, gain_db or lufs: %s", b)
		}
	}
	return m
}

var threeVariants = []Variant{
	{Label: "as built"},
	{Label: "more fuzz", Settings: []string{"fuzz.fuzz=1"}},
	{Label: "less fuzz", Settings: []string{"fuzz.fuzz=0.3"}},
}

// TestMatchedSet builds A/B sets from a synthesised dry take through the
// fuzz-only chain and checks the clips as files, measured again with the
// BS.1770-4 meter (itself checked against EBU Tech 3341 in package
// loudness):
//
//   - every clip within 0.1 LU of every other (the tolerance) and
//     within 0.01 LU of ab.json's target_lufs;
//   - every true peak at or under the ceiling (no tolerance: CeilingMargin
//     covers the output rounding), and when the ceiling decides the level,
//     the loudest true peak within 0.01 dB of it (the match is not timid);
//   - gain only: the bypass clip is the dry take times 10^(gain/20) to
//     within one output step, and a rendered clip is render.RenderFile's
//     float output times its gain to within one step plus float32 rounding;
//   - the sequence file matches its sample arithmetic (see Sequence) frame
//     by frame: exactly outside the crossfades, within 1.5 output steps in
//     them (two products rounded once more);
//   - nothing but the set is left beside it.
func TestMatchedSet(t *testing.T) {
	for _, tc := range []struct {
		name     string
		channels int
		target   float64
		format   string
		limited  bool
	}{
		// The demonstration phrase has a peak-to-loudness ratio near 15 dB:
		// at −18 LUFS its peaks stay under −1 dBTP; at −10 they cannot.
		{"mono, target reached", 1, -18, render.FormatPCM24, false},
		{"stereo, ceiling decides", 2, -10, render.FormatPCM16, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			dry := makeDry(t, dir, 2.5, tc.channels)
			ch, chPath := fuzzChain(t)
			out := filepath.Join(dir, "set")
			set, err := Build(context.Background(), Options{Chain: ch, ChainPath: chPath, Dry: dry, OutDir: out,
				Variants: threeVariants, Oversample: 2, TargetLUFS: tc.target, CeilingDBTP: -1, Format: tc.format,
				Sequence: SequenceOptions{Segment: 0.5, Crossfade: 0.01, Start: 0.3, Rounds: 2}})
			if err != nil {
				t.Fatal(err)
			}
			m := readManifest(t, out)
			if len(m.Variants) != 4 || m.Limited != tc.limited {
				t.Fatalf("%d clips, ceiling_limited %v; want 4, %v", len(m.Variants), m.Limited, tc.limited)
			}
			bits := 24
			if tc.format == render.FormatPCM16 {
				bits = 16
			}
			dryX, _ := readWAV(t, dry)
			lo, hi, maxTP := math.Inf(1), math.Inf(-1), math.Inf(-1)
			for _, v := range m.Variants {
				p := filepath.Join(out, v.File)
				x, f := readWAV(t, p)
				if f.Channels != tc.channels || f.SampleRate != 48000 || f.BitDepth != bits || len(x) != len(dryX) {
					t.Errorf("%s: %v, %d samples; want %d ch, %d-bit, %d samples", v.File, f, len(x), tc.channels, bits, len(dryX))
				}
				lufs, tp := meterFile(t, p)
				lo, hi, maxTP = math.Min(lo, lufs), math.Max(hi, lufs), math.Max(maxTP, tp)
				if d := math.Abs(lufs - *m.TargetLUFS); d > 0.01 {
					t.Errorf("%s: %.4f LUFS, target_lufs %.4f (off by %.4f LU, tolerance 0.01)", v.Label, lufs, *m.TargetLUFS, d)
				}
				if tp > m.CeilingDBTP {
					t.Errorf("%s: true peak %.5f dBTP over the %.1f dBTP ceiling", v.Label, tp, m.CeilingDBTP)
				}
				if v.Bypass != nil && *v.Bypass {
					g := math.Pow(10, *v.GainDB/20)
					worst := 0.0
					for i := range x {
						worst = math.Max(worst, math.Abs(x[i]-g*dryX[i]))
					}
					if worst > lsb(bits) {
						t.Errorf("bypass clip differs from the dry take × %.4f dB by %.3g (> one %d-bit step)", *v.GainDB, worst, bits)
					}
				}
			}
			t.Logf("clips %.4f…%.4f LUFS (spread %.5f LU), target %.4f LUFS, loudest true peak %.5f dBTP",
				lo, hi, hi-lo, *m.TargetLUFS, maxTP)
			if hi-lo > 0.1 {
				t.Errorf("clip loudness spread %.4f LU exceeds 0.1 LU", hi-lo)
			}
			if tc.limited {
				if maxTP < m.CeilingDBTP-0.01 {
					t.Errorf("ceiling-limited set: loudest true peak %.4f dBTP, want within 0.01 dB of %.1f", maxTP, m.CeilingDBTP)
				}
				if *m.TargetLUFS >= tc.target {
					t.Errorf("ceiling-limited set reached its target %.2f", *m.TargetLUFS)
				}
			} else if math.Abs(*m.TargetLUFS-tc.target) > 1e-9 {
				t.Errorf("target_lufs %.4f, want the requested %.1f", *m.TargetLUFS, tc.target)
			}

			// Gain only: one rendered clip against the render command's
			// own path, float32 output, times the recorded gain.
			ref := filepath.Join(dir, "ref.wav")
			eng, err := engine.Prepare(ch, 2)
			if err != nil {
				t.Fatal(err)
			}
			if _, err := render.RenderFile(context.Background(), eng, dry, ref, render.FileOptions{Format: render.FormatFloat32}); err != nil {
				t.Fatal(err)
			}
			refX, _ := readWAV(t, ref)
			os.Remove(ref)
			first := m.Variants[0]
			x, _ := readWAV(t, filepath.Join(out, first.File))
			g := math.Pow(10, *first.GainDB/20)
			worst := 0.0
			for i := range x {
				// float32 keeps 24 bits: relative error 2^-24 of the render.
				tol := lsb(bits) + g*math.Abs(refX[i])*0x1p-23
				if d := math.Abs(x[i] - g*refX[i]); d > tol {
					t.Fatalf("%s frame %d: %.9f, want the render × gain %.9f (tolerance %.3g)", first.Label, i/tc.channels, x[i], g*refX[i], tol)
				}
				worst = math.Max(worst, math.Abs(x[i]-g*refX[i]))
			}
			t.Logf("%s = render × %.4f dB to within %.3g", first.Label, *first.GainDB, worst)

			checkSequence(t, out, m, bits)
			if got := entries(t, dir); !slices.Equal(got, []string{"dry.wav", "set"}) {
				t.Errorf("beside the set: %q; want only dry.wav and set (no temporary folders)", got)
			}
			if set.Dir != out {
				t.Errorf("Set.Dir %q, want %q", set.Dir, out)
			}
		})
	}
}

// checkSequence recomputes the sequence file from the clip files with the
// arithmetic documented on Sequence and compares frame by frame.
func checkSequence(t *testing.T, out string, m manifest, bits int) {
	t.Helper()
	q := m.Sequence
	if q == nil {
		t.Fatal("ab.json has no sequence")
	}
	seq, f := readWAV(t, filepath.Join(out, q.File))
	nc := f.Channels
	S, F, P := q.SegmentFrames, q.CrossfadeFrames, q.PhraseStartFrame
	// 0.5 s segments, 10 ms fades, 0.3 s start at 48 kHz.
	if S != 24000 || F != 480 || P != 14400 {
		t.Fatalf("segment %d, fade %d, start %d frames; want 24000, 480, 14400", S, F, P)
	}
	K := int64(len(q.Segments))
	if K != 8 || int64(len(seq)/nc) != K*S+F || q.Frames != K*S+F {
		t.Fatalf("%d segments, %d frames; want 8 segments, K·S+F = %d frames", K, len(seq)/nc, K*S+F)
	}
	clips := map[string][]float64{}
	for _, v := range m.Variants {
		clips[v.File], _ = readWAV(t, filepath.Join(out, v.File))
	}
	for k, s := range q.Segments {
		if want := m.Variants[k%len(m.Variants)].File; s.File != want || s.StartFrame != int64(k)*S {
			t.Fatalf("segment %d: %s from frame %d, want %s from %d", k, s.File, s.StartFrame, want, int64(k)*S)
		}
	}
	g := math.Pow(10, float64(q.GainDB)/20)
	exact := q.GainDB == 0
	var worstFade float64
	for n := int64(0); n < K*S+F; n++ {
		k, j := n/S, n%S
		if k == K {
			k, j = K, n-K*S // the final fade-out
		}
		for c := 0; c < nc; c++ {
			var want float64
			fade := j < F
			if k < K {
				cur := clips[q.Segments[k].File]
				w := 1.0
				if fade {
					w = math.Sin(math.Pi / 2 * (float64(j) + 0.5) / float64(F))
				}
				want += w * cur[(P+j)*int64(nc)+int64(c)]
			}
			if fade && k > 0 {
				prev := clips[q.Segments[k-1].File]
				want += math.Cos(math.Pi/2*(float64(j)+0.5)/float64(F)) * prev[(P+S+j)*int64(nc)+int64(c)]
			}
			want *= g
			got := seq[n*int64(nc)+int64(c)]
			switch {
			case !fade && exact:
				if got != want {
					t.Fatalf("sequence frame %d (segment %d, frame %d of it) ch %d: %.9f, want exactly %.9f", n, k, j, c, got, want)
				}
			default:
				tol := 1.5 * lsb(bits)
				if d := math.Abs(got - want); d > tol {
					t.Fatalf("sequence frame %d (segment %d, frame %d of it) ch %d: %.9f, want %.9f ± %.3g", n, k, j, c, got, want, tol)
				} else if fade {
					worstFade = math.Max(worstFade, d)
				}
			}
		}
	}
	t.Logf("sequence: %d frames, gain %.4f dB, segments exact outside the fades, fades within %.3g (%.2f steps)",
		K*S+F, float64(q.GainDB), worstFade, worstFade/lsb(bits))
}

// TestBlindKey builds the same set twice, plain and blind, and checks that
// the blind set shows neutral labels only (no real label anywhere in ab.json
// or the page), that its key lies outside the folder, and that the key maps
// every neutral label back: the blind clip named for a label is, byte for
// byte, the plain set's clip of that label.
func TestBlindKey(t *testing.T) {
	dir := t.TempDir()
	dry := makeDry(t, dir, 2.0, 1)
	ch, chPath := fuzzChain(t)
	opt := Options{Chain: ch, ChainPath: chPath, Dry: dry, Variants: threeVariants, BypassLabel: "untouched take",
		Oversample: 2, TargetLUFS: -18, CeilingDBTP: -1, Sequence: SequenceOptions{Off: true}}
	plainOpt := opt
	plainOpt.OutDir = filepath.Join(dir, "plain")
	plain, err := Build(context.Background(), plainOpt)
	if err != nil {
		t.Fatal(err)
	}
	blindOpt := opt
	blindOpt.OutDir, blindOpt.Blind, blindOpt.Seed = filepath.Join(dir, "blind"), true, 5
	blind, err := Build(context.Background(), blindOpt)
	if err != nil {
		t.Fatal(err)
	}
	m := readManifest(t, blindOpt.OutDir)
	raw, _ := os.ReadFile(filepath.Join(blindOpt.OutDir, ManifestFile))
	page, _ := os.ReadFile(filepath.Join(blindOpt.OutDir, PageFile))
	for i, v := range m.Variants {
		if v.Label != NeutralLabel(i) || v.Settings != nil || v.Bypass != nil {
			t.Errorf("blind ab.json clip %d: label %q, settings %v, bypass %v; want %q and neither field", i, v.Label, v.Settings, v.Bypass, NeutralLabel(i))
		}
	}
	for _, c := range plain.Variants {
		for name, b := range map[string][]byte{"ab.json": raw, "index.html": page} {
			if bytes.Contains(b, []byte(c.Label)) {
				t.Errorf("blind %s names %q", name, c.Label)
			}
		}
	}
	// The page's data island holds neither settings, gains, true peaks nor
	// loudness ranges before the key is loaded: at one loudness, those are
	// what would tell the clips apart.
	_, island, _ := strings.Cut(string(page), `id="ab-data">`)
	island, _, _ = strings.Cut(island, "</script>")
	var pd struct {
		Clips []map[string]any `json:"clips"`
	}
	if err := json.Unmarshal([]byte(island), &pd); err != nil || len(pd.Clips) != len(plain.Variants) {
		t.Fatalf("page data %q: %v", island, err)
	}
	for _, c := range pd.Clips {
		for _, k := range []string{"settings", "gain_db", "true_peak_dbtp", "loudness_range_lu", "bypass", "chain_file"} {
			if _, ok := c[k]; ok {
				t.Errorf("blind page data has %s: %v", k, c)
			}
		}
	}
	if filepath.Dir(blind.KeyFile) != dir || filepath.Base(blind.KeyFile) != "blind-key.json" {
		t.Errorf("key file %s, want blind-key.json beside the set", blind.KeyFile)
	}
	kb, err := os.ReadFile(blind.KeyFile)
	if err != nil {
		t.Fatal(err)
	}
	var key Key
	if err := json.Unmarshal(kb, &key); err != nil {
		t.Fatal(err)
	}
	if key.Seed != 5 || len(key.Clips) != len(plain.Variants) {
		t.Fatalf("key: seed %d, %d clips; want 5, %d", key.Seed, len(key.Clips), len(plain.Variants))
	}
	seen := map[string]bool{}
	moved := 0
	for i, k := range key.Clips {
		if k.Blind != m.Variants[i].Label || k.File != m.Variants[i].File {
			t.Errorf("key entry %d is %s/%s, ab.json has %s/%s", i, k.Blind, k.File, m.Variants[i].Label, m.Variants[i].File)
		}
		var orig *Clip
		for j := range plain.Variants {
			if plain.Variants[j].Label == k.Label {
				orig = &plain.Variants[j]
				if j != i {
					moved++
				}
			}
		}
		if orig == nil || seen[k.Label] {
			t.Fatalf("key maps %s to %q: not one of the plain set's labels, or twice", k.Blind, k.Label)
		}
		seen[k.Label] = true
		if !slices.Equal(k.Settings, orig.Settings) || k.Bypass != orig.Bypass {
			t.Errorf("key %s: settings %v bypass %v; the plain clip has %v %v", k.Blind, k.Settings, k.Bypass, orig.Settings, orig.Bypass)
		}
		a, _ := os.ReadFile(filepath.Join(blindOpt.OutDir, k.File))
		b, _ := os.ReadFile(filepath.Join(plainOpt.OutDir, orig.File))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("blind clip %s (%s) differs from the plain clip %s", k.Blind, k.File, orig.File)
		}
	}
	if moved == 0 {
		t.Errorf("seed 5 left every clip in place; the shuffle did nothing")
	}
}

// TestForceReplaces writes a set over an earlier one: without Force it
// refuses and changes nothing; with it the earlier set's files that the new
// one does not reuse are gone and unrelated files stay.
func TestForceReplaces(t *testing.T) {
	dir := t.TempDir()
	dry := makeDry(t, dir, 1.0, 1)
	ch, chPath := fuzzChain(t)
	out := filepath.Join(dir, "set")
	opt := Options{Chain: ch, ChainPath: chPath, Dry: dry, OutDir: out, Variants: threeVariants, Oversample: 1,
		TargetLUFS: -18, CeilingDBTP: -1, Sequence: SequenceOptions{Segment: 0.25, Crossfade: 0.005, Rounds: 1}}
	if _, err := Build(context.Background(), opt); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(out, "notes.txt"), []byte("mine"), 0o644)
	before := entries(t, out)
	opt.Variants = threeVariants[:1]
	opt.Sequence = SequenceOptions{Off: true}
	_, err := Build(context.Background(), opt)
	var ee *ExistsError
	if !errors.As(err, &ee) || !strings.Contains(err.Error(), "force option") {
		t.Fatalf("second set without Force: %v, want an *ExistsError asking for the force option", err)
	}
	if got := entries(t, out); !slices.Equal(got, before) {
		t.Errorf("refused set changed the folder: %q → %q", before, got)
	}
	opt.Force = true
	if _, err := Build(context.Background(), opt); err != nil {
		t.Fatal(err)
	}
	want := []string{"01-as-built.wav", "02-bypass.wav", ManifestFile, PageFile, "notes.txt"}
	if got := entries(t, out); !slices.Equal(got, want) {
		t.Errorf("after --force: %q, want %q", got, want)
	}
	if got := entries(t, dir); !slices.Equal(got, []string{"dry.wav", "set"}) {
		t.Errorf("beside the set: %q", got)
	}
}

// TestBadInput checks that each mistake gives its typed error with a
// message naming the culprit, before anything is written.
func TestBadInput(t *testing.T) {
	dir := t.TempDir()
	dry := makeDry(t, dir, 1.0, 1)
	short := filepath.Join(dir, "short.wav")
	writeWAV(t, short, make([]float64, 9000), 1, 48000) // 0.1875 s
	ch, chPath := fuzzChain(t)
	older := filepath.Join(dir, "older")
	os.Mkdir(older, 0o755)
	os.WriteFile(filepath.Join(older, "01-as-built.wav"), []byte("earlier"), 0o644)
	good := func() Options {
		return Options{Chain: ch, ChainPath: chPath, Dry: dry, OutDir: filepath.Join(dir, "set"),
			Variants: []Variant{{Label: "as built"}}, Oversample: 1, TargetLUFS: -18, CeilingDBTP: -1,
			Sequence: SequenceOptions{Segment: 0.5, Crossfade: 0.01, Rounds: 1}}
	}
	var (
		ve *VariantError
		le *LabelError
		pe *models.FieldError
		ee *ExistsError
		se *ShortTakeError
		ce *chains.SetError
	)
	for _, tc := range []struct {
		name   string
		change func(*Options)
		target any
		msg    string
	}{
		{"unknown variant key", func(o *Options) {
			o.Variants = append(o.Variants, Variant{Label: "typo", Settings: []string{"fuzz.fuzzz=1"}})
		}, &ve, "fuzz.fuzzz"},
		{"unknown key is a chains.SetError", func(o *Options) {
			o.Variants = []Variant{{Label: "typo", Settings: []string{"nosuch.stage=1"}}}
		}, &ce, "nosuch.stage"},
		{"duplicate labels", func(o *Options) {
			o.Variants = append(o.Variants, Variant{Label: "As Built", Settings: []string{"fuzz.fuzz=1"}})
		}, &le, "As Built"},
		{"label of the bypass", func(o *Options) { o.Variants = append(o.Variants, Variant{Label: "bypass"}) }, &le, "bypass"},
		{"older clips without force", func(o *Options) { o.OutDir = older }, &ee, "force option"},
		{"take shorter than a segment", func(o *Options) { o.Sequence.Segment = 1.0 }, &se, "1.010 s"},
		{"segment start past the take", func(o *Options) { o.Sequence.Start = 0.6 }, &se, "dry.wav"},
		{"take shorter than a loudness block", func(o *Options) { o.Dry = short }, &se, "400 ms"},
		// Library errors name the option's field; the command maps it to
		// its flag.
		{"crossfade over half a segment", func(o *Options) { o.Sequence.Crossfade = 0.3 }, &pe, `crossfade "0.3s"`},
		{"ceiling above full scale", func(o *Options) { o.CeilingDBTP = 0.5 }, &pe, `ceiling "0.5"`},
		{"unknown label in the order", func(o *Options) { o.Sequence.Order = []string{"as built", "nobody"} }, &pe, "nobody"},
		{"key inside the set", func(o *Options) {
			o.Blind, o.Seed, o.KeyPath = true, 1, filepath.Join(o.OutDir, "key.json")
		}, &pe, `key "`},
		{"missing chain file", func(o *Options) {
			o.Variants = []Variant{{Label: "other", ChainFile: "nowhere.toml"}}
		}, &ve, "nowhere.toml"},
		{"bad format", func(o *Options) { o.Format = "mp3" }, &pe, "mp3"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			before := entries(t, dir)
			o := good()
			tc.change(&o)
			_, err := Build(context.Background(), o)
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.As(err, tc.target) {
				t.Errorf("error %T %q is not %T", err, err, tc.target)
			}
			if !strings.Contains(err.Error(), tc.msg) || strings.Contains(err.Error(), "\n") {
				t.Errorf("error %q should be one line naming %q", err, tc.msg)
			}
			if got := entries(t, dir); !slices.Equal(got, before) {
				t.Errorf("files changed: %q → %q", before, got)
			}
			if b, _ := os.ReadFile(filepath.Join(older, "01-as-built.wav")); string(b) != "earlier" {
				t.Error("the earlier clip was touched")
			}
		})
	}
}

// TestInterrupted cancels a build while it renders: an error, and nothing
// left on disk.
func TestInterrupted(t *testing.T) {
	dir := t.TempDir()
	dry := makeDry(t, dir, 1.0, 1)
	ch, chPath := fuzzChain(t)
	ctx, cancel := context.WithCancel(context.Background())
	calls := 0
	_, err := Build(ctx, Options{Chain: ch, ChainPath: chPath, Dry: dry, OutDir: filepath.Join(dir, "set"),
		Variants: threeVariants, Oversample: 1, TargetLUFS: -18, CeilingDBTP: -1, Sequence: SequenceOptions{Off: true},
		Jobs: 1, Progress: func(done, total int64) { calls++; cancel() }})
	cancel()
	if err == nil {
		t.Fatal("cancelled build returned no error")
	}
	if got := entries(t, dir); !slices.Equal(got, []string{"dry.wav"}) {
		t.Errorf("after an interrupted build: %q, want only dry.wav", got)
	}
	t.Logf("progress calls before the stop: %d; error: %v", calls, err)
}

// TestOtherChainFile checks where a "@FILE" variant's chain is looked for:
// the working directory first, then the folder of the command's chain file.
func TestOtherChainFile(t *testing.T) {
	ch, chPath := fuzzChain(t)
	// Tests run in abtest/, where germanium.toml is not: found beside
	// ../chains/fuzz-only.toml.
	if got, want := ResolveChainFile("germanium.toml", chPath), filepath.Join("..", "chains", "germanium.toml"); got != want {
		t.Errorf("ResolveChainFile: %q, want %q", got, want)
	}
	// A file of that name in the working directory wins.
	if got := ResolveChainFile("helpers_test.go", chPath); got != "helpers_test.go" {
		t.Errorf("ResolveChainFile(helpers_test.go): %q, want the working-directory file", got)
	}
	v, err := ParseVariant("germanium, hot: @germanium.toml supply=9.5V")
	if err != nil {
		t.Fatal(err)
	}
	jobs, err := makeJobs(Options{Chain: ch, ChainPath: chPath, Variants: []Variant{v}, BypassLabel: "bypass"})
	if err != nil {
		t.Fatal(err)
	}
	ge, err := chains.Load(filepath.Join("..", "chains", "germanium.toml"))
	if err != nil {
		t.Fatal(err)
	}
	// The germanium chain is a positive-ground build (supply = "-9V"): the
	// override sets the magnitude and keeps the file's polarity.
	if jobs[0].ch.Name != ge.Name || jobs[0].ch.Supply != -9.5 || ge.Supply != -9 {
		t.Errorf("variant chain %q supply %g; want %q with the 9.5 V override at the file's polarity, -9.5 V", jobs[0].ch.Name, jobs[0].ch.Supply, ge.Name)
	}
	if !jobs[1].bypass || len(jobs) != 2 {
		t.Errorf("want the variant and the bypass, got %d jobs", len(jobs))
	}
}

// A dead variant is flagged (seen case: a germanium build's variant that
// came out dead was raised to match and nothing said so). The germanium
// example with Q1's collector trimmer at zero saturates Q2 and passes
// almost nothing; its match needs over 20 dB more gain than the build as
// written, past QuieterLimitDB: ab.json flags it, names it in the set's
// warnings, carries its chain's idle-point warnings, and leaves the
// working build unflagged. A blind set flags it by its neutral label.
func TestDeadVariantFlagged(t *testing.T) {
	dir := t.TempDir()
	dry := makeDry(t, dir, 2.5, 1)
	chPath := filepath.Join("..", "chains", "germanium.toml")
	ch, err := chains.Load(chPath)
	if err != nil {
		t.Fatal(err)
	}
	vars := []Variant{{Label: "as built", Settings: []string{}}, {Label: "trim1 at zero", Settings: []string{"fuzz.trim1=0"}}}
	for _, blind := range []bool{false, true} {
		out := filepath.Join(dir, map[bool]string{false: "set", true: "blind"}[blind])
		set, err := Build(context.Background(), Options{Chain: ch, ChainPath: chPath, Dry: dry, OutDir: out, Variants: vars,
			Oversample: 1, TargetLUFS: DefaultTargetLUFS, CeilingDBTP: DefaultCeilingDBTP, Sequence: SequenceOptions{Off: true},
			Blind: blind, Seed: 1, KeyPath: out + "-key.json"})
		if err != nil {
			t.Fatal(err)
		}
		var dead, built *Clip
		for i := range set.Variants {
			switch set.Variants[i].Label {
			case "trim1 at zero":
				dead = &set.Variants[i]
			case "as built":
				built = &set.Variants[i]
			}
		}
		if dead.Flag != MuchQuieter || !(float64(dead.GainOverOthersDB) > QuieterLimitDB) || built.Flag != "" {
			t.Fatalf("blind %v: dead %q (%.1f dB over), as built %q", blind, dead.Flag, float64(dead.GainOverOthersDB), built.Flag)
		}
		if len(set.Warnings) == 0 || !strings.HasPrefix(set.Warnings[0], dead.Shown()+": "+MuchQuieter) {
			t.Errorf("blind %v: set warnings %q", blind, set.Warnings)
		}
		b, err := os.ReadFile(filepath.Join(out, ManifestFile))
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(b), `"flag": "`+MuchQuieter+`"`) {
			t.Errorf("blind %v: ab.json has no flag", blind)
		}
		if !blind && !strings.Contains(strings.Join(dead.Warnings, "\n"), "saturated at idle") {
			t.Errorf("the dead variant's own warnings: %q", dead.Warnings)
		}
		if blind && strings.Contains(string(b), "saturated") {
			t.Errorf("a blind ab.json names what a clip's chain does")
		}
		page, _ := os.ReadFile(filepath.Join(out, PageFile))
		if !strings.Contains(string(page), `"flag":"`+MuchQuieter+`"`) {
			t.Errorf("blind %v: the page has no flag", blind)
		}
	}
}
