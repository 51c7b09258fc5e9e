package plotting

import (
	"bytes"
	"errors"
	"image/color"
	"math"
	"strings"
	"testing"

	"renderchain/dsp/spectrum"
)

// ranges renders a figure and returns each panel's drawn axis ranges.
func ranges(t *testing.T, f *Figure) [][4]float64 {
	t.Helper()
	d, err := f.render(&bytes.Buffer{}, SVG)
	if err != nil {
		t.Fatal(err)
	}
	return d.ranges
}

// The response figure's numbers: its phase lines are the closed-form
// unwrapped phase 90° − atan(f/30) − 3·atan(f/fc) (given wrapped, the
// curves cross −180° and would break there); tolerance 1e-9° (rounding).
// Its group-delay lines are the closed form Σ (1/ωc)/(1 + (f/c)²) within
// the three-point formula's bound h²/6·max|φ”'|/ω per section (see
// spectrum.GroupDelay; ends twice that), four sections. The title
// carries the chain, path and settings; the gain axis keeps the top 60 dB
// and every point within it is inside the drawn range.
func TestResponseFigureData(t *testing.T) {
	spec := responseSpec()
	f, err := ResponseFigure(spec)
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Panels) != 3 || !f.Key {
		t.Fatalf("%d panels, key %v; want gain, phase, group delay and a key", len(f.Panels), f.Key)
	}
	for _, w := range []string{chainName, "Small-signal response", "source → out", "supply=9V", "fuzz.fuzz=0.8"} {
		if !strings.Contains(f.Title, w) {
			t.Errorf("title %q lacks %q", f.Title, w)
		}
	}
	h := math.Ln10 / spectrum.PointsPerDecade
	for i, fc := range responseCorners {
		ph, gd := f.Panels[1].Lines[i], f.Panels[2].Lines[i]
		for k, hz := range ph.X {
			if want := closedPhaseDeg(hz, fc); math.Abs(ph.Y[k]-want) > 1e-9 {
				t.Fatalf("curve %d at %g Hz: phase %.12f°, closed form %.12f°", i, hz, ph.Y[k], want)
			}
			bound := 4 * h * h / 6 * 0.5 / (2 * math.Pi * hz)
			if k == 0 || k == len(gd.X)-1 {
				bound *= 2
			}
			if want := closedDelay(hz, fc); math.Abs(gd.Y[k]-want) > bound+1e-12 {
				t.Fatalf("curve %d at %g Hz: group delay %.9g s, closed form %.9g s", i, hz, gd.Y[k], want)
			}
		}
		if ph.Style != i+1 || f.Panels[0].Lines[i].Label != spec.Curves[i].Label {
			t.Errorf("curve %d: style %d label %q", i, ph.Style, f.Panels[0].Lines[i].Label)
		}
	}
	// A harmonic response drawn with its own dash keeps its variant's
	// colour and glyph (Group) instead of its style's dash.
	spec.Curves[2].Dash = 2
	f2, err := ResponseFigure(spec)
	if err != nil {
		t.Fatal(err)
	}
	if ln := f2.Panels[0].Lines[2]; ln.Style != 0 || ln.Group != 3 || ln.Dash != 2 {
		t.Errorf("dashed curve: style %d group %d dash %d, want 0, 3, 2", ln.Style, ln.Group, ln.Dash)
	}
	// A negative dash draws solid in the variant's colour.
	spec.Curves[2].Dash = -1
	if f2, err = ResponseFigure(spec); err != nil {
		t.Fatal(err)
	}
	if ln := f2.Panels[0].Lines[2]; ln.Style != 0 || ln.Group != 3 || ln.Dash != 0 {
		t.Errorf("solid curve: style %d group %d dash %d, want 0, 3, 0", ln.Style, ln.Group, ln.Dash)
	}
	spec.Curves[2].Dash = 0
	r := ranges(t, f)
	top := math.Inf(-1)
	for _, c := range spec.Curves {
		for _, v := range c.DB {
			top = math.Max(top, v)
		}
	}
	if r[0][2] > top-60 || r[0][3] < top {
		t.Errorf("gain axis %g..%g dB does not hold the top 60 dB below %g dB", r[0][2], r[0][3], top)
	}
	for p := 1; p < 3; p++ {
		for _, ln := range f.Panels[p].Lines {
			for k, y := range ln.Y {
				if y < r[p][2] || y > r[p][3] || ln.X[k] < r[p][0] || ln.X[k] > r[p][1] {
					t.Fatalf("panel %d: point (%g, %g) outside the drawn range %v", p, ln.X[k], y, r[p])
				}
			}
		}
	}
}

// The scope view: input and output panels hold every sample inside their
// drawn ranges; the output panel reaches both rails (they lie within one
// signal span of the output's 1.0 to 7.1 V); the input panel (±0.1 V)
// reaches ground but names the 9 V rail as off the scale; the transfer
// curve is the last cycle, sample for sample.
func TestScopeFigureData(t *testing.T) {
	s := scopeSpec()
	f, err := ScopeFigure(s)
	if err != nil {
		t.Fatal(err)
	}
	r := ranges(t, f)
	panels := append(append([]Panel{}, f.Panels...), f.Beside...)
	for p, pn := range panels {
		for _, ln := range pn.Lines {
			for k := range ln.Y {
				if ln.X[k] < r[p][0] || ln.X[k] > r[p][1] || ln.Y[k] < r[p][2] || ln.Y[k] > r[p][3] {
					t.Fatalf("%s: point (%g, %g) outside %v", pn.Title, ln.X[k], ln.Y[k], r[p])
				}
			}
		}
	}
	if !(r[1][2] < 0 && r[1][3] > 9) || !(r[2][2] < 0 && r[2][3] > 9) {
		t.Errorf("output ranges %v and %v do not reach both rails", r[1], r[2])
	}
	if len(f.Panels[1].Marks) != 2 || len(f.Panels[0].Marks) != 1 || f.Panels[0].Marks[0].Y != 0 {
		t.Errorf("marks: input %v, output %v", f.Panels[0].Marks, f.Panels[1].Marks)
	}
	if !strings.Contains(f.Panels[0].Title, "v+ 9 V above") {
		t.Errorf("input title %q does not name the rail off the scale", f.Panels[0].Title)
	}
	tr := f.Beside[0].Lines[0]
	n := len(s.In.V)
	if len(tr.X) != 49 || tr.X[0] != s.In.V[n-49] || tr.Y[48] != s.Out.V[n-1] {
		t.Errorf("transfer curve: %d points, want the last cycle of 48 samples and its closing sample", len(tr.X))
	}
}

// Harmonic bars are the given levels, in the variants' styles, with the
// stimulus and THD in the words.
func TestHarmonicsFigureData(t *testing.T) {
	s := harmonicsSpec()
	f, err := HarmonicsFigure(s)
	if err != nil {
		t.Fatal(err)
	}
	p := f.Panels[0]
	if len(p.Categories) != 9 || p.Categories[0] != "H2" || p.Categories[8] != "H10" {
		t.Errorf("categories %v", p.Categories)
	}
	for i, set := range s.Sets {
		b := p.Bars[i]
		if b.Style != set.Style+1 || !strings.HasPrefix(b.Label, set.Label) || !strings.Contains(b.Label, "THD_F") {
			t.Errorf("group %d: %+v", i, b)
		}
		for k := range b.Values {
			want := math.Inf(-1)
			if k < len(set.DBc) {
				want = set.DBc[k]
			}
			if b.Values[k] != want {
				t.Errorf("group %d H%d: %g, want %g", i, k+2, b.Values[k], want)
			}
		}
	}
	// Floor: the lowest finite level (−120 dBc) rounded down, 10 dB below.
	if p.Floor != -130 || !strings.Contains(f.Title, s.Stimulus) {
		t.Errorf("floor %g, title %q", p.Floor, f.Title)
	}
}

// Waveforms: one panel per variant on one symmetric scale that holds the
// largest peak of any wave, time from Start in steps of 1/SampleRate.
func TestWaveformFigureData(t *testing.T) {
	s := waveSpec(false)
	f, err := WaveformFigure(s)
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Panels) != 3 {
		t.Fatalf("%d panels", len(f.Panels))
	}
	peak := 0.0
	for _, w := range s.Waves {
		for _, v := range w.Samples {
			peak = math.Max(peak, math.Abs(v))
		}
	}
	r := ranges(t, f)
	for i, pn := range f.Panels {
		if pn.Y.Min != -pn.Y.Max || pn.Y.Max < peak || pn.Y.Max != f.Panels[0].Y.Max {
			t.Errorf("panel %d: range %g..%g, peak %g", i, pn.Y.Min, pn.Y.Max, peak)
		}
		ln := pn.Lines[0]
		if ln.Colour != color.Color(Colour(s.Waves[i].Style)) || ln.X[0] != s.Start || math.Abs(ln.X[1]-ln.X[0]-1/s.SampleRate) > 1e-15 || r[i][0] != s.Start {
			t.Errorf("panel %d: time starts %g step %g, axis from %g", i, ln.X[0], ln.X[1]-ln.X[0], r[i][0])
		}
	}
	o, _ := WaveformFigure(waveSpec(true))
	if len(o.Panels) != 1 || len(o.Panels[0].Lines) != 3 || !o.Key {
		t.Errorf("overlay: %d panels", len(o.Panels))
	}
}

// Third-octave lines are the band levels spectrum.LTAS computed, exactly.
func TestThirdOctaveFigureData(t *testing.T) {
	s, bands := bandsSpec()
	f, err := ThirdOctaveFigure(s)
	if err != nil {
		t.Fatal(err)
	}
	for i, ln := range f.Panels[0].Lines {
		if len(ln.Y) != len(bands[i]) {
			t.Fatalf("variant %d: %d points, %d bands", i, len(ln.Y), len(bands[i]))
		}
		for k, b := range bands[i] {
			if ln.Y[k] != b.Level || ln.X[k] != b.Nominal {
				t.Fatalf("variant %d band %d: (%g, %g), analysis (%g, %g)", i, k, ln.X[k], ln.Y[k], b.Nominal, b.Level)
			}
		}
	}
}

// The spectrogram's picture against its analysis: the colour scale tops
// at the highest level rounded up to 10 dB and spans 80 dB; cells take
// the highest level they cover, so the hottest cell equals the
// spectrogram's maximum (to float32 rounding, 1e-4 dB); and in every
// column whose frames lie wholly before the step the hottest row holds
// 1 kHz, after it 3 kHz (row bands are 0.9 % wide; tolerance one row).
func TestSpectrogramFigureData(t *testing.T) {
	s, sd, sw := spectrogramSpec()
	f, err := SpectrogramFigure(s)
	if err != nil {
		t.Fatal(err)
	}
	_, _, fa, fb, step := steppedTones()
	top := math.Max(sd.MaxLevel(), sw.MaxLevel())
	for i, pn := range f.Panels {
		h := pn.Heat
		if h.Hi != 10*math.Ceil(top/10) || h.Hi-h.Lo != 80 {
			t.Errorf("panel %d: colour scale %g..%g dB, top level %g", i, h.Lo, h.Hi, top)
		}
		sg := []*spectrum.Spectrogram{sd, sw}[i]
		hot := math.Inf(-1)
		for _, row := range h.Values {
			for _, v := range row {
				hot = math.Max(hot, v)
			}
		}
		if math.Abs(hot-sg.MaxLevel()) > 1e-4 {
			t.Errorf("panel %d: hottest cell %g dB, spectrogram max %g dB", i, hot, sg.MaxLevel())
		}
		rows, cols := len(h.Values), len(h.Values[0])
		rowHz := func(r float64) float64 { return h.Y0 * math.Pow(h.Y1/h.Y0, r/float64(rows)) }
		half := float64(sg.FrameLen) / 2 / sg.SampleRate
		checked := 0
		for c := 0; c < cols; c++ {
			// One frame per column here (fewer frames than columns).
			tc := sg.Time(c)
			want := 0.0
			switch {
			case tc+half <= step:
				want = fa
			case tc-half >= step:
				want = fb
			default:
				continue
			}
			best := 0
			for r := range h.Values {
				if h.Values[r][c] > h.Values[best][c] {
					best = r
				}
			}
			if lo, hi := rowHz(float64(best)-1), rowHz(float64(best)+2); want < lo || want > hi {
				t.Fatalf("panel %d column %d (%.3f s): hottest row %.0f–%.0f Hz, want %g Hz", i, c, tc, rowHz(float64(best)), rowHz(float64(best)+1), want)
			}
			checked++
		}
		if cols != sg.Frames() || checked < cols-8 {
			t.Errorf("panel %d: %d columns for %d frames, %d checked", i, cols, sg.Frames(), checked)
		}
	}
}

// Bad input is refused with a FigureError (errors.Is ErrFigure) naming
// what is wrong, never drawn.
func TestBuilderErrors(t *testing.T) {
	bad := responseSpec()
	bad.Curves[1].Hz = append([]float64{}, bad.Curves[1].Hz...)
	bad.Curves[1].Hz[3] = bad.Curves[1].Hz[2]
	noStim := harmonicsSpec()
	noStim.Stimulus = ""
	nanScope := scopeSpec()
	nanScope.Out.V = append([]float64{}, nanScope.Out.V...)
	nanScope.Out.V[7] = math.NaN()
	spg, _, _ := spectrogramSpec()
	spg.MaxHz = 30000
	for _, tc := range []struct {
		name string
		err  error
		want string
	}{
		{"no curves", errOf(ResponseFigure(ResponseSpec{})), "no curves"},
		{"frequencies not increasing", errOf(ResponseFigure(bad)), `response curve 2 "tone.tone=0.5"`},
		{"no stimulus", errOf(HarmonicsFigure(noStim)), "stimulus"},
		{"NaN on the scope", errOf(ScopeFigure(nanScope)), `trace "fuzz.c2" sample 7`},
		{"scope too short", errOf(ScopeFigure(ScopeSpec{SampleRate: 48000, FrequencyHz: 1000, In: Trace{V: []float64{0}}, Out: Trace{V: []float64{0}}})), "at least one cycle"},
		{"wave NaN", errOf(WaveformFigure(WaveSpec{SampleRate: 48000, Waves: []Wave{{Label: "x", Samples: []float64{0, math.Inf(1)}}}})), `wave "x" sample 1`},
		{"bands mismatched", errOf(ThirdOctaveFigure(BandsSpec{Sets: []BandSet{{Label: "x", Hz: []float64{100}}}})), `variant "x"`},
		{"spectrogram above Nyquist", errOf(SpectrogramFigure(spg)), "Nyquist"},
		{"size not a number", errOf(nil, (&Figure{Width: math.NaN(), Panels: []Panel{{}}}).Render(&bytes.Buffer{}, PNG)), "size NaN"},
		{"heat rows ragged", errOf(nil, (&Figure{Panels: []Panel{{Heat: &Heat{Values: [][]float64{{1, 2}, {1}}, X1: 1, Y1: 1, Hi: 1}}}}).Render(&bytes.Buffer{}, PNG)), "row 1 has 1 cells"},
	} {
		if !errors.Is(tc.err, ErrFigure) || !strings.Contains(tc.err.Error(), tc.want) {
			t.Errorf("%s: %v, want ErrFigure mentioning %q", tc.name, tc.err, tc.want)
		}
	}
}

func errOf(_ *Figure, err error) error { return err }

// The automatic legend goes where it hides no curve: with lines along
// the top of the axes it moves to the bottom half.
func TestLegendAvoidsCurves(t *testing.T) {
	x := []float64{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10}
	top := []float64{10, 10, 9.8, 9.9, 10, 9.7, 10, 9.9, 10, 9.8, 10}
	low := []float64{6, 6.5, 7, 7.5, 8, 8.5, 9, 9.2, 9.4, 9.6, 9.8}
	f := &Figure{Panels: []Panel{{X: Axis{Label: "x"}, Y: Axis{Label: "y", Min: 0, Max: 10.5},
		Lines: []Line{{Label: "top", X: x, Y: top}, {Label: "rising", X: x, Y: low, Style: 2}}}}}
	var buf bytes.Buffer
	d, err := f.render(&buf, PNG)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.legends) != 1 {
		t.Fatalf("%d legends", len(d.legends))
	}
	lg, da := d.legends[0], d.data[0]
	if lg.Max.Y > (da.Min.Y+da.Max.Y)/2 {
		t.Errorf("legend %v is not in the bottom half of the data area %v", lg, da)
	}
}

// With more frames than columns, a column takes the highest level of its
// frames: a 5 ms, 2 kHz burst in a 20 s recording of quiet hiss still
// reaches its own level in the picture (to float32 rounding, 1e-4 dB),
// in the column holding its time.
func TestSpectrogramPoolsFrames(t *testing.T) {
	const fs = 8000.0
	x := make([]float64, int(20*fs))
	for i := range x {
		x[i] = 1e-4 * math.Sin(float64(i)*1.7) // a quiet tone far from the burst
	}
	b0 := int(12.3 * fs)
	for i := b0; i < b0+40; i++ {
		x[i] += 0.5 * math.Sin(2*math.Pi*2000*float64(i)/fs)
	}
	sg, err := spectrum.NewSpectrogram(x, fs, 256, 64)
	if err != nil {
		t.Fatal(err)
	}
	h := spectrogramHeat(sg, 40, 4000, spectrogramRows, spectrogramMaxCols)
	cols := len(h.Values[0])
	if sg.Frames() <= cols {
		t.Fatalf("%d frames for %d columns: the test needs pooling", sg.Frames(), cols)
	}
	hot, hotCol := math.Inf(-1), -1
	for _, row := range h.Values {
		for c, v := range row {
			if v > hot {
				hot, hotCol = v, c
			}
		}
	}
	if math.Abs(hot-sg.MaxLevel()) > 1e-4 {
		t.Errorf("hottest cell %g dB, spectrogram max %g dB", hot, sg.MaxLevel())
	}
	colTime := h.X0 + (float64(hotCol)+0.5)*(h.X1-h.X0)/float64(cols)
	if math.Abs(colTime-12.3) > (h.X1-h.X0)/float64(cols)+float64(sg.FrameLen)/fs {
		t.Errorf("burst drawn at %.3f s, want 12.3 s", colTime)
	}
}

// A figure far too small for its labels is an error, not a panic.
func TestTinyFigure(t *testing.T) {
	f := testFigure()
	f.Width, f.PanelHeight = 0.5, 0.3
	err := f.Render(&bytes.Buffer{}, PNG)
	if err != nil && !errors.Is(err, ErrFigure) {
		t.Errorf("tiny figure: %v, want nil or ErrFigure", err)
	}
}
