package measure

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"

	"renderchain/plotting"
)

func clipperReport(t *testing.T, sets []string, sweep *Sweep, spectrum bool) *Report {
	t.Helper()
	vs, err := Expand(sets)
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Run(context.Background(), loadChain(t, "clipper"), Plan{Variants: vs, Freq: 1000, Amplitude: 1, Sweep: sweep,
		Options: Options{Spectrum: spectrum}})
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// The JSON of a result carries the interface's fixed names with values
// consistent with each other: thd_percent is 100·√(Σ(10^(dBc/20))²) over
// the listed harmonics (the THD_F definition applied to the output's own
// numbers), fundamental.dbv is 20·log10 of its RMS.
func TestResultJSON(t *testing.T) {
	rep := clipperReport(t, nil, nil, false)
	b, err := json.Marshal(rep.Measurements[0])
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		THD         *float64 `json:"thd_percent"`
		THDN        *float64 `json:"thdn_percent"`
		Fundamental struct {
			DBV  *float64 `json:"dbv"`
			VRMS float64  `json:"v_rms"`
		} `json:"fundamental"`
		Harmonics []struct {
			Order int      `json:"order"`
			DBc   *float64 `json:"dbc"`
		} `json:"harmonics"`
	}
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if m.THD == nil || m.THDN == nil || m.Fundamental.DBV == nil || len(m.Harmonics) != 9 {
		t.Fatalf("JSON lacks interface fields: %s", b)
	}
	var sum float64
	for i, h := range m.Harmonics {
		if h.Order != i+2 {
			t.Errorf("harmonics[%d].order = %d", i, h.Order)
		}
		if h.DBc != nil {
			a := math.Pow(10, *h.DBc/20)
			sum += a * a
		}
	}
	// Tolerance 1e-9 relative: JSON round trip of doubles is exact, the
	// dB conversion loses a few ulps.
	if got := 100 * math.Sqrt(sum); math.Abs(got-*m.THD) > 1e-9**m.THD {
		t.Errorf("thd_percent %.12g, but the harmonics give %.12g", *m.THD, got)
	}
	if got := 20 * math.Log10(m.Fundamental.VRMS); math.Abs(got-*m.Fundamental.DBV) > 1e-9 {
		t.Errorf("fundamental.dbv %.12g, v_rms gives %.12g", *m.Fundamental.DBV, got)
	}
	if *m.THDN < *m.THD*(1-1e-9) {
		t.Errorf("THD+N %.6g %% below THD_F %.6g %%: THD+N counts everything THD does", *m.THDN, *m.THD)
	}
}

func TestReportCSVAndTable(t *testing.T) {
	sw, _ := ParseLevelSweep("0.1V..1V", 3)
	rep := clipperReport(t, []string{"clip.R1=10k,4k7"}, sw, false)
	var buf bytes.Buffer
	if err := rep.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatalf("CSV does not parse: %v", err)
	}
	if len(recs) != 7 {
		t.Fatalf("%d CSV records, want a header and 6 rows", len(recs))
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	for _, name := range []string{"thd_percent", "thdn_percent", "output_dbv", "h2_dbc", "h10_dbc", "peaks_flattened", "exceeds_full_scale", "label", "sweep_value"} {
		if _, ok := col[name]; !ok {
			t.Errorf("CSV header lacks %s: %v", name, recs[0])
		}
	}
	for i, rec := range recs[1:] {
		thd, err := strconv.ParseFloat(rec[col["thd_percent"]], 64)
		if err != nil || math.Abs(thd-rep.Measurements[i].THDPercent) > 1e-6*thd {
			t.Errorf("row %d thd_percent %q, want %g", i, rec[col["thd_percent"]], rep.Measurements[i].THDPercent)
		}
		if rec[col["h2_dbc"]] == "" {
			// −300 dBc is finite; only an undefined value is empty.
			t.Errorf("row %d: h2_dbc empty", i)
		}
	}
	buf.Reset()
	if err := rep.WriteTable(&buf); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, want := range []string{"clip.R1=4k7", "THD %", "input V pk", "100 mV"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
	buf.Reset()
	single := clipperReport(t, nil, nil, false)
	if err := single.WriteTable(&buf); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"THD_F", "THD+N", "H10", "even/odd", "peaks flat YES", "file clips "} {
		if !strings.Contains(buf.String(), want) {
			t.Errorf("single table lacks %q:\n%s", want, buf.String())
		}
	}
}

// Every report kind draws: the SVG names each curve's settings in its
// legend.
func TestFigures(t *testing.T) {
	sw, _ := ParseLevelSweep("0.1V..1V", 3)
	ch := loadChain(t, "blend")
	vs, _ := Expand([]string{"tone.tone=0,1"})
	resp, err := RunResponse(context.Background(), ch, vs, LogGrid(20, 20000, 20), ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	single, err := clipperReport(t, []string{"clip.R1=10k,4k7"}, nil, true).Figure()
	if err != nil {
		t.Fatal(err)
	}
	sweep, err := clipperReport(t, []string{"clip.R1=10k,4k7"}, sw, false).Figure()
	if err != nil {
		t.Fatal(err)
	}
	respFig, err := resp.Figure(false)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		fig  *plotting.Figure
		want []string
	}{
		{"spectrum", single, []string{"clip.R1=4k7", "H3", "frequency (Hz)", "dBc"}},
		{"sweep", sweep, []string{"THD_F · clip.R1=10k", "H3 · clip.R1=4k7", "source amplitude (V peak)"}},
		{"response", respFig, []string{"tone.tone=0", "tone.tone=1", "phase (degrees)", "20k"}},
	} {
		var buf bytes.Buffer
		if err := tc.fig.Render(&buf, plotting.SVG); err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		for _, w := range tc.want {
			if !bytes.Contains(buf.Bytes(), []byte(w)) {
				t.Errorf("%s figure lacks %q", tc.name, w)
			}
		}
	}
}

// The kept spectrum of a coherent record is the plain DFT: the fundamental's
// bin reads the analysed fundamental's dBV exactly (tolerance 1e-9 dB), and
// its frequency axis runs in steps of fs/N.
func TestKeptSpectrum(t *testing.T) {
	r := clipperReport(t, nil, nil, true).Measurements[0]
	s := r.Spectrum
	if s == nil {
		t.Fatal("no spectrum kept")
	}
	k := int(math.Round(r.FrequencyHz * float64(r.Record.Samples) / r.SampleRate))
	if math.Abs(s.Hz[k]-r.FrequencyHz) > 1e-9 || math.Abs(s.DBV[k]-float64(r.Fundamental.DBV)) > 1e-9 {
		t.Errorf("bin %d: %g Hz %.6f dBV; fundamental %g Hz %.6f dBV", k, s.Hz[k], s.DBV[k], r.FrequencyHz, float64(r.Fundamental.DBV))
	}
	k3 := 3 * k
	if math.Abs(s.DBV[k3]-float64(r.Harmonics[1].DBV)) > 1e-6 {
		t.Errorf("H3 bin %.6f dBV, analysis %.6f dBV", s.DBV[k3], float64(r.Harmonics[1].DBV))
	}
}

// A figure under the analysis floor prints as under it. The floor is the
// larger of the rate converter's stopband, 10^(−100/20) = 1e-5 (design
// figure of package resample), and the settle tolerance. An RC low-pass
// is linear: its harmonics are rounding (THD near 1e-12 %), so the table
// shows "< 0.001 %" and "< -100.00" dBc with no phase, and no even/odd
// ratio; the JSON keeps the exact figure. The clipper's THD is far above
// the floor and prints as measured.
func TestTableFloors(t *testing.T) {
	if got := AnalysisFloor(DefaultSettleTolerance); math.Abs(got-1e-5) > 1e-20 {
		t.Errorf("floor %g, want 1e-5", got)
	}
	if got := AnalysisFloor(1e-3); got != 1e-3 {
		t.Errorf("floor at a 1e-3 tolerance: %g", got)
	}
	r, err := Sine(context.Background(), loadChain(t, "rc-lowpass"), 1000, 0.1, Options{Oversample: 1})
	if err != nil {
		t.Fatal(err)
	}
	if !(r.THDPercent < 1e-6) || math.Abs(float64(r.AnalysisFloorDB)+100) > 1e-9 {
		t.Fatalf("THD %g %%, floor %g dB: not the linear case", r.THDPercent, float64(r.AnalysisFloorDB))
	}
	var buf bytes.Buffer
	if err := (&Report{Measurements: []*Result{r}}).WriteTable(&buf); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, want := range []string{"THD_F      < 0.001 %  (< -100.0 dB)", "< -100.00  < 0.001        —", "even/odd   — "} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "e-1") {
		t.Errorf("a figure in exponent form:\n%s", out)
	}
	buf.Reset()
	clip := clipperReport(t, nil, nil, false)
	clip.WriteTable(&buf)
	if m := clip.Measurements[0]; !strings.Contains(buf.String(), fmt.Sprintf("THD_F      %.4g %%", m.THDPercent)) {
		t.Errorf("the clipper's THD %.4g %% is not printed as measured:\n%s", m.THDPercent, buf.String())
	}
}
