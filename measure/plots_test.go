package measure

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/spectrum"
	"renderchain/plotting"
)

// checkPicture draws a figure as PNG and fails on what the picture
// checks of package plotting find (size, file size, curves outside their
// axes, a style that vanished).
func checkPicture(t *testing.T, name string, f *plotting.Figure) {
	t.Helper()
	in, err := plotting.Inspect(f)
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	for _, p := range in.Problems() {
		t.Errorf("%s: %s", name, p)
	}
}

// The scope keeps whole settled cycles, as the solver computes them: the
// sine run again at the internal rate with no oversampling (48 kHz × 4 =
// 192 kHz, the same rate the measurement's solver ran at), so no rate
// converter band-limits the view. The source trace is the generated sine,
// amplitude·sin(2π·f·t) at the record's own times (to rounding, 1e-12 V),
// and the probed output of an RC low-pass is the closed-form steady state
// |H|·A·sin(2π·f·t + arg H), H = 1/(1 + jωRC) at the bilinear-warped
// frequency (Oppenheim & Schafer sec. 7.2), which the trapezoidal rule
// gives exactly once the start has died away (RC = 0.1 ms against a
// record half a second in: e^−5000 of it is left). Tolerance 1e-9 V,
// rounding with room: the band-limited record at 48 kHz misses the same
// closed form by 1.4e-7 V (the converter's passband ripple), so the test
// tells the two views apart.
func TestScopeRCLowpass(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	const f, amp = 1000.0, 0.5
	r, err := Sine(context.Background(), ch, f, amp, Options{Scope: true})
	if err != nil {
		t.Fatal(err)
	}
	sc := r.Scope
	if sc == nil {
		t.Fatal("no scope kept")
	}
	want := int(math.Round(ScopeCycles*internalFs/f)) + 1
	if len(sc.In) != want || len(sc.Out) != want || sc.SampleRate != internalFs || sc.FrequencyHz != f || !sc.Internal {
		t.Fatalf("scope: %d and %d samples at %g Hz of a %g Hz sine (internal %v); want %d at %g Hz of %g Hz", len(sc.In), len(sc.Out),
			sc.SampleRate, sc.FrequencyHz, sc.Internal, want, float64(internalFs), f)
	}
	h := rcLowpass(warped(f, internalFs))
	const tol = 1e-9
	worstIn, worstOut := 0.0, 0.0
	for i := range sc.In {
		th := 2 * math.Pi * f * (sc.Start + float64(i)/internalFs)
		worstIn = math.Max(worstIn, math.Abs(sc.In[i]-amp*math.Sin(th)))
		worstOut = math.Max(worstOut, math.Abs(sc.Out[i]-amp*cmplx.Abs(h)*math.Sin(th+cmplx.Phase(h))))
	}
	t.Logf("source trace error %.2e V; output trace error %.2e V (tolerance %.2e V)", worstIn, worstOut, tol)
	if worstIn > 1e-12 {
		t.Errorf("source trace differs from the generated sine by %.3g V", worstIn)
	}
	if worstOut > tol {
		t.Errorf("output trace differs from the closed-form steady state by %.3g V, want ≤ %.3g V", worstOut, tol)
	}
	// Without the option nothing is kept.
	r, err = Sine(context.Background(), ch, f, amp, Options{})
	if err != nil || r.Scope != nil {
		t.Errorf("scope kept without being asked for (%v)", err)
	}
	// At 1× there is no converter to band-limit the record: the view is
	// the analysed record itself, at the analysis rate.
	r, err = Sine(context.Background(), ch, f, amp, Options{Scope: true, Oversample: 1})
	if err != nil || r.Scope.Internal || r.Scope.SampleRate != 48000 || r.Scope.Start != r.Settle.Seconds {
		t.Errorf("1×: scope %+v (%v); want the record at 48 kHz", r.Scope, err)
	}
}

// A record shorter than ScopeCycles cycles (10 Hz: one 100 ms cycle) is
// kept whole and closed by its first sample, which the settled, periodic
// output repeats: the first and last samples agree to the settle rule's
// 1e-5 of the amplitude.
func TestScopeShortRecord(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	r, err := Sine(context.Background(), ch, 10, 0.5, Options{Scope: true})
	if err != nil {
		t.Fatal(err)
	}
	sc := r.Scope
	// The internal-rate run's record: the analysis record's length times
	// the factor (a whole cycle of 10 Hz either way).
	if n := r.Record.Samples * 4; len(sc.Out) != n+1 || len(sc.In) != n+1 {
		t.Fatalf("record of %d samples kept as %d and %d, want %d", n, len(sc.In), len(sc.Out), n+1)
	}
	if d := math.Abs(sc.In[len(sc.In)-1] - sc.In[0]); d > 1e-9 {
		t.Errorf("source does not close the cycle: %g V apart", d)
	}
	if _, err := plotting.ScopeFigure(plotting.ScopeSpec{SampleRate: sc.SampleRate, FrequencyHz: sc.FrequencyHz,
		In: plotting.Trace{V: sc.In}, Out: plotting.Trace{V: sc.Out}}); err != nil {
		t.Errorf("a one-cycle scope does not draw: %v", err)
	}
}

// The scope view draws the kept traces as they are (the figure's data
// are the measurement's), with the supply rail and ground, and a title
// that states the test signal, the chain and the condition; it passes
// the picture checks.
func TestScopeFigures(t *testing.T) {
	vs, err := Expand([]string{"clip.R1=10k,4k7"})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Run(context.Background(), loadChain(t, "clipper"), Plan{Variants: vs, Freq: 1000, Amplitude: 1,
		Options: Options{Scope: true}})
	if err != nil {
		t.Fatal(err)
	}
	figs, err := rep.ScopeFigures()
	if err != nil {
		t.Fatal(err)
	}
	if len(figs) != 2 {
		t.Fatalf("%d scope views for 2 measurements", len(figs))
	}
	for i, f := range figs {
		m := rep.Measurements[i]
		in, out, tr := f.Panels[0].Lines[0], f.Panels[1].Lines[0], f.Beside[0].Lines[0]
		if !slices.Equal(in.Y, m.Scope.In) || !slices.Equal(out.Y, m.Scope.Out) {
			t.Errorf("view %d: the traces drawn are not the kept ones", i+1)
		}
		// Time runs from 0 in steps of 1/fs at the scope's (internal)
		// rate; the transfer curve is the last cycle (192 samples and
		// one at 192 kHz) of output against source.
		cyc := int(math.Round(m.Scope.SampleRate/1000)) + 1
		if out.X[0] != 0 || math.Abs(out.X[1]-1/m.Scope.SampleRate) > 1e-15 || len(tr.X) != cyc || cyc != 193 ||
			!slices.Equal(tr.Y, m.Scope.Out[len(m.Scope.Out)-cyc:]) {
			t.Errorf("view %d: time axis or transfer curve wrong", i+1)
		}
		for _, w := range []string{"1 kHz sine, 1 V peak at the source", rep.Chain, m.Settings[0]} {
			if !strings.Contains(f.Title, w) {
				t.Errorf("view %d title %q lacks %q", i+1, f.Title, w)
			}
		}
		if !strings.Contains(f.Panels[0].Title+f.Panels[1].Title, "v+ 9 V") {
			t.Errorf("view %d: the 9 V rail is not named (%q, %q)", i+1, f.Panels[0].Title, f.Panels[1].Title)
		}
		checkPicture(t, fmt.Sprintf("scope view %d", i+1), f)
	}
}

// The sweep figure draws every THD_F, H2 and H3 value as measured, or on
// the display floor when below it, and says so; the output level as
// measured. A linear RC low-pass puts its distortion under the floor, a
// diode clipper's odd harmonics well above it.
func TestSweepFigureFloor(t *testing.T) {
	sw, err := ParseLevelSweep("0.1V..1V", 3)
	if err != nil {
		t.Fatal(err)
	}
	var below, above int
	for _, name := range []string{"rc-lowpass", "clipper"} {
		rep, err := Run(context.Background(), loadChain(t, name), Plan{Freq: 1000, Amplitude: 0.1, Sweep: sw})
		if err != nil {
			t.Fatal(err)
		}
		f, err := rep.Figure()
		if err != nil {
			t.Fatal(err)
		}
		level, dist := f.Panels[0], f.Panels[1]
		floored := false
		for i, m := range rep.Measurements {
			if level.Lines[0].Y[i] != float64(m.Fundamental.DBV) {
				t.Errorf("%s step %d: level %g dBV drawn, %g measured", name, i, level.Lines[0].Y[i], float64(m.Fundamental.DBV))
			}
			for k, v := range []float64{float64(m.THDDB), harmonicDBc(m, 2), harmonicDBc(m, 3)} {
				want, floor := v, float64(m.AnalysisFloorDB)
				if v < floor {
					want, floored = floor, true
					below++
				} else {
					above++
				}
				if got := dist.Lines[k].Y[i]; got != want {
					t.Errorf("%s step %d: %s drawn at %g dB, measured %g dB, want %g", name, i, dist.Lines[k].Label, got, v, want)
				}
			}
		}
		if floored != strings.Contains(dist.Title, "under the −100 dB analysis floor: drawn on it") {
			t.Errorf("%s: floored %v but the panel title reads %q", name, floored, dist.Title)
		}
		checkPicture(t, name+" sweep", f)
	}
	if below == 0 || above == 0 {
		t.Errorf("%d values below the floor and %d above: the test must see both", below, above)
	}
}

// The spectrum figure's bars are the measured harmonics in dBc, its
// markers the measured lines in dBV, its spectrum the kept spectrum; the
// key names each condition with its THD_F, the title the test signal.
func TestSpectrumFigureData(t *testing.T) {
	rep := clipperReport(t, []string{"clip.R1=10k,4k7"}, nil, true)
	f, err := rep.Figure()
	if err != nil {
		t.Fatal(err)
	}
	spec, bars := f.Panels[0], f.Panels[1]
	if !strings.Contains(f.Title, "1 kHz sine, 1 V peak at the source") || !strings.Contains(f.Title, rep.Chain) {
		t.Errorf("title %q", f.Title)
	}
	for i, m := range rep.Measurements {
		b := bars.Bars[i]
		if b.Style != i+1 || !strings.Contains(b.Label, m.Settings[0]) || !strings.Contains(b.Label, fmt.Sprintf("THD_F %.3g %%", float64(m.THDPercent))) {
			t.Errorf("condition %d: bar group %q style %d", i, b.Label, b.Style)
		}
		for _, h := range m.Harmonics {
			if b.Values[h.Order-2] != float64(h.DBc) {
				t.Errorf("condition %d H%d: bar %g, measured %g dBc", i, h.Order, b.Values[h.Order-2], float64(h.DBc))
			}
		}
		line, marks := spec.Lines[2*i], spec.Lines[2*i+1]
		if !slices.Equal(line.Y, m.Spectrum.DBV[1:]) || marks.Y[0] != float64(m.Fundamental.DBV) || marks.Y[2] != float64(m.Harmonics[1].DBV) {
			t.Errorf("condition %d: spectrum or line markers are not the measured ones", i)
		}
	}
	if bars.Floor < FigureFloorDB(rep.Measurements) || FigureFloorDB(rep.Measurements) != -100 {
		t.Errorf("bar floor %g dBc below the analysis floor %g dB (−100 dB at the default settle tolerance)", bars.Floor,
			FigureFloorDB(rep.Measurements))
	}
	checkPicture(t, "spectrum", f)
}

// The knob positions in titles: the chain's own, less those a condition
// sets, then the settings every condition shares.
func TestTitleSettings(t *testing.T) {
	knobs := []string{"fuzz.fuzz=0.7", "tone.tone=0.5", "volume.level=0.75"}
	got := titleSettings(knobs, [][]string{{"tone.tone=0", "supply=9V"}, {"tone.tone=1", "supply=9V"}}, []string{"supply=9V"})
	if want := []string{"fuzz.fuzz=0.7", "volume.level=0.75", "supply=9V"}; !slices.Equal(got, want) {
		t.Errorf("titleSettings = %q, want %q", got, want)
	}
	ch, err := chains.Load("../chains/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	k := Knobs(ch)
	if !slices.Contains(k, "fuzz.fuzz=0.7") || !slices.Contains(k, "tone.tone=0.55") || !slices.Contains(k, "volume.level=0.75") {
		t.Errorf("demo knobs %q", k)
	}
}

// rcLadder is three 10 kΩ / 10 nF low-pass sections, the second and
// third behind ideal buffers: H = (1/(1 + jωRC))³, phase −3·atan(ωRC),
// reaching −270°.
func rcLadder() string {
	src := "name = \"three buffered RC sections\"\n[input]\npeak = \"1V\"\n[output]\nload = \"none\"\nfull_scale = \"1V\"\n"
	for i, id := range []string{"a", "b", "c"} {
		src += fmt.Sprintf("[[stage]]\nid = %q\nbuffer = %v\nparts = [\n", id, i > 0) +
			"  { ref = \"R1\", kind = \"resistor\", value = \"10k\", pins = [\"in\", \"out\"] },\n" +
			"  { ref = \"C1\", kind = \"capacitor\", value = \"10n\", pins = [\"out\", \"gnd\"] },\n]\n"
	}
	return src
}

// The response figure of three buffered RC sections on the default grid:
// gain as computed; phase unwrapped through −180° to the closed form
// −3·atan(f/fc) (tolerance 1e-6°: nodal analysis is exact to rounding);
// group delay 3·RC/(1 + (f/fc)²) within GroupDelay's documented interior
// error h²/6·max|φ”'|/ω, h = ln 10/48 and max|φ”'| = 3·0.5 rad for
// three real poles. That is the leading term of the truncation error and
// is reached at the corner; 1 % more covers the next, O(h⁴), term
// (h² = 0.0023).
func TestResponseFigureUnwrapsAndDelays(t *testing.T) {
	ch, err := chains.Parse("ladder.toml", rcLadder())
	if err != nil {
		t.Fatal(err)
	}
	grid, err := DefaultGrid(20, 20000)
	if err != nil {
		t.Fatal(err)
	}
	dg, _ := spectrum.DecadeGrid(20, 20000, spectrum.PointsPerDecade)
	if !slices.Equal(grid, dg) || len(grid) != 146 {
		t.Fatalf("default grid of %d points, want DecadeGrid's 146", len(grid))
	}
	rep, err := RunResponse(context.Background(), ch, nil, grid, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	wrapped := false
	for i := 1; i < len(rep.Curves[0].Points); i++ {
		if math.Abs(float64(rep.Curves[0].Points[i].Deg-rep.Curves[0].Points[i-1].Deg)) > 180 {
			wrapped = true
		}
	}
	if !wrapped {
		t.Fatal("the computed phase never wraps: the test would not see unwrapping")
	}
	f, err := rep.Figure(true)
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Panels) != 3 || !strings.Contains(f.Title, "source → out") || !strings.Contains(f.Title, ch.Name) {
		t.Fatalf("%d panels, title %q", len(f.Panels), f.Title)
	}
	rc := 10e3 * 10e-9
	fc := 1 / (2 * math.Pi * rc)
	h := math.Log(10) / spectrum.PointsPerDecade
	worstDeg, worstTau := 0.0, 0.0
	for i, p := range rep.Curves[0].Points {
		if f.Panels[0].Lines[0].Y[i] != float64(p.DB) {
			t.Fatalf("gain %g drawn at %g Hz, %g computed", f.Panels[0].Lines[0].Y[i], p.Hz, float64(p.DB))
		}
		wantDeg := -3 * math.Atan(p.Hz/fc) * 180 / math.Pi
		worstDeg = math.Max(worstDeg, math.Abs(f.Panels[1].Lines[0].Y[i]-wantDeg))
		if i == 0 || i == len(grid)-1 {
			continue // one-sided differences at the ends
		}
		wantTau := 3 * rc / (1 + (p.Hz/fc)*(p.Hz/fc))
		bound := 1.01 * h * h / 6 * 1.5 / (2 * math.Pi * p.Hz)
		err := math.Abs(f.Panels[2].Lines[0].Y[i] - wantTau)
		worstTau = math.Max(worstTau, err/bound)
		if err > bound {
			t.Errorf("group delay at %.1f Hz: %.6g s, closed form %.6g s, bound %.2g s", p.Hz, f.Panels[2].Lines[0].Y[i], wantTau, bound)
		}
	}
	t.Logf("phase error %.2e°; group-delay error at most %.6f of its bound", worstDeg, worstTau)
	if worstDeg > 1e-6 {
		t.Errorf("unwrapped phase off the closed form by %.3g°", worstDeg)
	}
	checkPicture(t, "response", f)
}

// A probe with no signal on it (the supply rail) is drawn as such: the
// key says so instead of a THD of NaN, the spectrum panel sits at its
// −200 dBV floor and says there is no signal above it, and the flat
// scope traces draw (a range narrower than rounding once hung the tick
// marker).
func TestFiguresOfSilentProbe(t *testing.T) {
	rep, err := Run(context.Background(), loadChain(t, "fuzz-si"), Plan{Freq: 1000, Amplitude: 0.1,
		Options: Options{Probe: "v+", Spectrum: true, Scope: true}})
	if err != nil {
		t.Fatal(err)
	}
	f, err := rep.Figure()
	if err != nil {
		t.Fatal(err)
	}
	spec, bars := f.Panels[0], f.Panels[1]
	if !strings.Contains(bars.Bars[0].Label, "no signal at the probe") || !strings.Contains(spec.Title, "no signal above −200 dBV") ||
		spec.Y.Min != SpectrumFloorDBV {
		t.Errorf("silent probe: key %q, title %q, spectrum from %g dBV", bars.Bars[0].Label, spec.Title, spec.Y.Min)
	}
	scopes, err := rep.ScopeFigures()
	if err != nil {
		t.Fatal(err)
	}
	in, err := plotting.Inspect(scopes[0])
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range in.Problems() {
		t.Error(p)
	}
}
