package abtest

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"renderchain/dsp/spectrum"
	"renderchain/internal/testchains"
	"renderchain/measure"
	"renderchain/models"
	"renderchain/plotting"
)

// rcChainFile writes the shared first-order RC low-pass test chain
// (testchains.RCLowpass: 10 kΩ, 22 nF, corner 1/(2π·RC) = 723 Hz) as a
// chain file: a linear variant whose response has a closed form.
func rcChainFile(t *testing.T, dir string) string {
	t.Helper()
	p := filepath.Join(dir, "rc.toml")
	if err := os.WriteFile(p, []byte(testchains.RCLowpass), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// loudPatch writes a 2 s mono take: a 110 Hz sine at 0.02 peak, 0.4 peak
// from 1.0 s to 1.6 s. Its loudest half second on the 0.1 s grid starts
// at 1.0 s (the first of the two windows wholly inside the loud part).
func loudPatch(t *testing.T, dir string) string {
	t.Helper()
	const fs = 48000
	x := make([]float64, 2*fs)
	for i := range x {
		a := 0.02
		if i >= fs && i < fs*16/10 {
			a = 0.4
		}
		x[i] = a * math.Sin(2*math.Pi*110*float64(i)/fs)
	}
	p := filepath.Join(dir, "patch.wav")
	writeWAV(t, p, x, 1, fs)
	return p
}

// The numbers behind a set's pictures are those of the analyses they come
// from, clip by clip in page order:
//   - the response of each variant is measure.SmallSignal's, and the RC
//     variant's is the closed form 1/(1 + jωRC) (0.01 dB and 0.01°:
//     nodal analysis is exact to rounding);
//   - the harmonics are measure.Sine's at the stated test sine;
//   - the waveform is the written clip's samples from the middle of the
//     take's loudest half second (1.0 s + 0.25 s − 20 ms = 1.23 s);
//   - the bands are spectrum.LTAS of the written clip;
//
// the bypass has no response or harmonics; the figures draw these numbers
// in the clips' page positions and pass the picture checks.
func TestPicturesAreTheAnalyses(t *testing.T) {
	dir := t.TempDir()
	ch, chPath := fuzzChain(t)
	rc := rcChainFile(t, dir)
	dry := loudPatch(t, dir)
	o := Options{Chain: ch, ChainPath: chPath, Dry: dry, OutDir: filepath.Join(dir, "set"), Oversample: 2,
		TargetLUFS: DefaultTargetLUFS, CeilingDBTP: DefaultCeilingDBTP, Sequence: SequenceOptions{Off: true},
		Variants: []Variant{{Label: "as built"}, {Label: "low-pass", ChainFile: rc}},
		Pictures: PictureOptions{On: true, SineHz: 440, SineV: 0.05}}
	set, err := Build(context.Background(), o)
	if err != nil {
		t.Fatal(err)
	}
	wantFiles := []string{PictureResponse, PictureHarmonics, PictureWaveform, PictureBands}
	var got []string
	for _, p := range set.Pictures {
		got = append(got, p.File)
		if _, err := os.Stat(filepath.Join(set.Dir, p.File)); err != nil {
			t.Error(err)
		}
	}
	if !slices.Equal(got, wantFiles) {
		t.Fatalf("pictures %q, want %q", got, wantFiles)
	}

	// The numbers, computed again from the written set.
	o.Pictures, o.Jobs = PictureOptions{On: true, SineHz: 440, SineV: 0.05}, 1
	take, err := openTake(dry)
	if err != nil {
		t.Fatal(err)
	}
	var clips []picClip
	for i, c := range set.Variants {
		pc := picClip{style: i, label: c.Label, file: filepath.Join(set.Dir, c.File)}
		if !c.Bypass {
			v := Variant{Label: c.Label}
			if c.ChainFile != "" {
				v.ChainFile = c.ChainFile
			}
			if pc.ch, _, err = v.resolve(ch, chPath); err != nil {
				t.Fatal(err)
			}
		}
		clips = append(clips, pc)
	}
	d, err := computePictures(context.Background(), o, take, clips)
	if err != nil {
		t.Fatal(err)
	}
	grid, _ := measure.DefaultGrid(20, 20000)
	for i, c := range clips {
		if c.ch == nil {
			if d.response[i] != nil || d.harmonics[i] != nil {
				t.Errorf("bypass clip %d has a response or harmonics", i)
			}
		} else {
			pts, err := measure.SmallSignal(c.ch, grid, measure.ResponseOptions{SampleRate: 48000, Oversample: 2})
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(pts, d.response[i]) {
				t.Errorf("%s: response differs from measure.SmallSignal", c.label)
			}
			r, err := measure.Sine(context.Background(), c.ch, 440, 0.05, measure.Options{SampleRate: 48000, Oversample: 2})
			if err != nil {
				t.Fatal(err)
			}
			if float64(r.THDPercent) != float64(d.harmonics[i].THDPercent) || !slices.Equal(r.Harmonics, d.harmonics[i].Harmonics) {
				t.Errorf("%s: harmonics differ from measure.Sine", c.label)
			}
		}
		x, _ := readWAV(t, c.file)
		first := int(math.Round(1.23 * 48000))
		if math.Abs(d.waveStart-1.23) > 1e-12 || !slices.Equal(d.waves[i], x[first:first+int(WaveSeconds*48000)]) {
			t.Errorf("%s: waveform from %g s is not the clip's samples from 1.23 s", c.label, d.waveStart)
		}
		l, _ := spectrum.NewLTAS(48000, 0)
		if err := l.Write(x); err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(l.Bands(), d.bands[i]) {
			t.Errorf("%s: bands differ from the clip's LTAS", c.label)
		}
	}
	// The RC variant against its closed form.
	worst, worstDeg := 0.0, 0.0
	for _, p := range d.response[1] {
		h := 1 / complex(1, 2*math.Pi*p.Hz*10e3*22e-9)
		worst = math.Max(worst, math.Abs(float64(p.DB)-20*math.Log10(cmplx.Abs(h))))
		worstDeg = math.Max(worstDeg, math.Abs(float64(p.Deg)-cmplx.Phase(h)*180/math.Pi))
	}
	if worst > 0.01 || worstDeg > 0.01 {
		t.Errorf("RC variant off 1/(1+jωRC) by %.3g dB, %.3g°", worst, worstDeg)
	}
	// A linear variant makes no harmonic above the analysis floor.
	for _, h := range d.harmonics[1].Harmonics {
		if float64(h.DBc) > -100 {
			t.Errorf("RC variant H%d at %.1f dBc", h.Order, float64(h.DBc))
		}
	}

	figs, err := d.figures()
	if err != nil {
		t.Fatal(err)
	}
	for _, nf := range figs {
		checkFigure(t, nf, d)
	}
}

// checkFigure: the figure draws the numbers in the clips' page styles, its
// title states what it shows, and it passes the picture checks.
func checkFigure(t *testing.T, nf namedFigure, d *pictureData) {
	t.Helper()
	f := nf.fig
	switch nf.file {
	case PictureResponse:
		for k, ln := range f.Panels[0].Lines {
			if ln.Style != k+1 || ln.Y[0] != float64(d.response[k][0].DB) {
				t.Errorf("response curve %d: style %d", k, ln.Style)
			}
		}
		if !strings.Contains(f.Title, bypassNote) {
			t.Errorf("response title %q does not say the bypass is left out", f.Title)
		}
	case PictureHarmonics:
		for k, b := range f.Panels[0].Bars {
			for _, h := range d.harmonics[k].Harmonics {
				if b.Style != k+1 || b.Values[h.Order-2] != float64(h.DBc) {
					t.Errorf("harmonics of clip %d: style %d, H%d %g dBc drawn, %g measured", k, b.Style, h.Order, b.Values[h.Order-2], float64(h.DBc))
				}
			}
		}
		for k, b := range f.Panels[0].Bars {
			quiet := !slices.ContainsFunc(b.Values, func(v float64) bool { return v >= f.Panels[0].Floor })
			if quiet != strings.Contains(b.Label, "no harmonic above") {
				t.Errorf("harmonics of clip %d: all under the floor %v, key %q", k, quiet, b.Label)
			}
		}
		if !strings.Contains(f.Title, "440 Hz sine, 50 mV peak at the source") {
			t.Errorf("harmonics title %q does not state the test sine", f.Title)
		}
	case PictureWaveform:
		if len(f.Panels) != len(d.clips) {
			t.Errorf("%d waveform panels for %d clips", len(f.Panels), len(d.clips))
		}
		for k, p := range f.Panels {
			ln := p.Lines[0]
			if ln.Colour != plotting.Colour(k) || !slices.Equal(ln.Y, d.waves[k]) || math.Abs(ln.X[0]-d.waveStart) > 1e-12 {
				t.Errorf("waveform panel %d", k)
			}
		}
	case PictureBands:
		for k, ln := range f.Panels[0].Lines {
			if ln.Style != k+1 || ln.Y[10] != d.bands[k][10].Level {
				t.Errorf("bands of clip %d", k)
			}
		}
	}
	in, err := plotting.Inspect(f)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range in.Problems() {
		// A variant whose harmonics all lie under the display floor (a
		// linear circuit) has no bars to show; the key says so.
		if nf.file == PictureHarmonics {
			if k := emptySet(f); k >= 0 && strings.HasPrefix(p, fmt.Sprintf("style %d ", k)) {
				continue
			}
		}
		t.Errorf("%s: %s", nf.file, p)
	}
}

// emptySet returns the style of the harmonics figure's bar group whose
// key says it has no harmonic above the floor, or −1.
func emptySet(f *plotting.Figure) int {
	for _, b := range f.Panels[0].Bars {
		if strings.Contains(b.Label, "no harmonic above") {
			if slices.ContainsFunc(b.Values, func(v float64) bool { return v >= f.Panels[0].Floor }) {
				return -1 // the key would be wrong
			}
			return b.Style - 1
		}
	}
	return -1
}

// ab.json and the page list the pictures; the page gives every clip the
// colour of its style; a blind set gets none; a later set without
// pictures retires the earlier pictures; a test sine the take cannot
// carry is refused before any work, naming the option.
func TestPicturesInSetAndPage(t *testing.T) {
	dir := t.TempDir()
	ch, chPath := fuzzChain(t)
	dry := makeDry(t, dir, 1.0, 1)
	o := Options{Chain: ch, ChainPath: chPath, Dry: dry, OutDir: filepath.Join(dir, "set"), Oversample: 2,
		TargetLUFS: DefaultTargetLUFS, CeilingDBTP: DefaultCeilingDBTP, Sequence: SequenceOptions{Off: true},
		Variants: []Variant{{Label: "a"}, {Label: "b", Settings: []string{"fuzz.fuzz=0.2"}}}, Pictures: PictureOptions{On: true}}
	set, err := Build(context.Background(), o)
	if err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(set.Dir, ManifestFile))
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		Pictures []Plot `json:"pictures"`
	}
	if err := json.Unmarshal(b, &m); err != nil || len(m.Pictures) != 4 {
		t.Fatalf("ab.json pictures %v (%v)", m.Pictures, err)
	}
	page, err := os.ReadFile(filepath.Join(set.Dir, PageFile))
	if err != nil {
		t.Fatal(err)
	}
	for i := range set.Variants {
		if !strings.Contains(string(page), `"colour":"`+plotting.Hex(i)+`"`) {
			t.Errorf("page lacks clip %d's colour %s", i, plotting.Hex(i))
		}
	}
	if !strings.Contains(string(page), `"file":"`+PictureBands+`"`) {
		t.Error("page data does not list the pictures")
	}
	// Again without pictures, forced: the old pictures go.
	o.Force, o.Pictures = true, PictureOptions{}
	if _, err := Build(context.Background(), o); err != nil {
		t.Fatal(err)
	}
	for _, n := range entries(t, set.Dir) {
		if strings.HasPrefix(n, "fig-") {
			t.Errorf("an earlier picture stayed: %s", n)
		}
	}
	// Blind: none.
	o.OutDir, o.Blind, o.Seed, o.Force, o.Pictures = filepath.Join(dir, "blind"), true, 5, false, PictureOptions{On: true}
	bs, err := Build(context.Background(), o)
	if err != nil {
		t.Fatal(err)
	}
	if len(bs.Pictures) != 0 {
		t.Errorf("a blind set got pictures %v", bs.Pictures)
	}
	// A take shorter than one analysis frame of the long-term spectrum:
	// no third-octave picture, and a warning says why.
	short := filepath.Join(dir, "short.wav")
	x, _ := readWAV(t, dry)
	writeWAV(t, short, x[:24000], 1, 48000)
	o.Blind, o.Dry, o.OutDir = false, short, filepath.Join(dir, "short")
	ss, err := Build(context.Background(), o)
	if err != nil {
		t.Fatal(err)
	}
	if len(ss.Pictures) != 3 || ss.Pictures[2].File != PictureWaveform || !strings.Contains(strings.Join(ss.Warnings, " "), "no third-octave") {
		t.Errorf("short take: pictures %v, warnings %q", ss.Pictures, ss.Warnings)
	}
	o.Dry = dry
	// Out of range.
	o.Blind, o.OutDir = false, filepath.Join(dir, "bad")
	for _, p := range []PictureOptions{{On: true, SineHz: 30000}, {On: true, SineHz: 2}, {On: true, SineV: 200}} {
		o.Pictures = p
		_, err := Build(context.Background(), o)
		var fe *models.FieldError
		if !errors.As(err, &fe) || (fe.Field != "sine_freq" && fe.Field != "sine_level") {
			t.Errorf("%+v: %v, want a field error on sine_freq or sine_level", p, err)
		}
		if _, err := os.Stat(o.OutDir); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("%+v: the refused set left %s", p, o.OutDir)
		}
	}
}

// loudestStart finds the loud patch, and a take shorter than the window
// starts at 0.
func TestLoudestStart(t *testing.T) {
	dir := t.TempDir()
	p := loudPatch(t, dir)
	s, err := loudestStart(p, 0.5, 0.1)
	if err != nil || s != 48000 {
		t.Errorf("loudest half second starts at frame %d (%v), want 48000", s, err)
	}
	if s, err := loudestStart(p, 5, 0.1); err != nil || s != 0 {
		t.Errorf("window longer than the take: %d (%v), want 0", s, err)
	}
}

// An interruption while the pictures are made is reported as such, like
// one in any other step (Build then removes its workspace).
func TestPicturesInterrupted(t *testing.T) {
	dir := t.TempDir()
	ch, chPath := fuzzChain(t)
	o := Options{Chain: ch, ChainPath: chPath, Dry: makeDry(t, dir, 1.0, 1), OutDir: filepath.Join(dir, "set"), Oversample: 2,
		TargetLUFS: DefaultTargetLUFS, CeilingDBTP: DefaultCeilingDBTP, Sequence: SequenceOptions{Off: true},
		Pictures: PictureOptions{On: true}}
	b, err := planSet(o)
	if err != nil {
		t.Fatal(err)
	}
	if err := b.workspace(); err != nil {
		t.Fatal(err)
	}
	defer b.outs.Abort()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	err = b.addPictures(ctx, &Set{Warnings: nil})
	if err == nil || !strings.Contains(err.Error(), "interrupted") {
		t.Errorf("cancelled pictures: %v", err)
	}
}
