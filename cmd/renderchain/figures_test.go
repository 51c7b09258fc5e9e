package main

import (
	"encoding/json"
	"encoding/xml"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"renderchain/dsp/wavio"
	"renderchain/plotting"
)

// pngWidth opens a PNG file and returns its width in pixels.
func pngWidth(t *testing.T, path string) int {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return img.Bounds().Dx()
}

// cmWide is the pixel width of a figure cm centimetres wide at
// plotting.DPI (120 pixels per inch, 2.54 cm to the inch).
func cmWide(cm float64) float64 { return cm / 2.54 * plotting.DPI }

// measure --plot writes the measurement figure and one scope view per
// measurement beside it, named on stderr; PNG files decode at the
// figures' widths (18 cm, and 22 cm for the scope view, to a pixel). A
// run of more measurements than scope views are drawn for says so and
// writes none.
func TestMeasurePlotFiles(t *testing.T) {
	chain := measTestChain(t)
	dir := t.TempDir()
	plot := filepath.Join(dir, "m.png")
	code, _, errs := capture(t, "measure", "--chain", chain, "--amplitude", "300mV", "--set", "clip.R1=10k,22k", "--plot", plot)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for path, cm := range map[string]float64{plot: 18, filepath.Join(dir, "m-scope-1.png"): 22, filepath.Join(dir, "m-scope-2.png"): 22} {
		if w := pngWidth(t, path); math.Abs(float64(w)-cmWide(cm)) > 1 {
			t.Errorf("%s is %d px wide, want %.0f", path, w, cmWide(cm))
		}
		if !strings.Contains(errs, "plot: "+path) {
			t.Errorf("stderr does not name %s:\n%s", path, errs)
		}
	}
	if !strings.Contains(errs, "scope view, clip.R1=22k") {
		t.Errorf("stderr does not say which condition a view shows:\n%s", errs)
	}
	// SVG, one measurement: FILE-scope.svg, both well-formed.
	svg := filepath.Join(dir, "one.svg")
	if code, _, errs := capture(t, "measure", "--chain", chain, "--plot", svg, "--quiet"); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, p := range []string{svg, filepath.Join(dir, "one-scope.svg")} {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if probs := plotting.SVGProblems(b); len(probs) > 0 || xml.Unmarshal(b, new(struct{})) != nil {
			t.Errorf("%s: %q", p, probs)
		}
	}
	// 17 sweep steps: more than maxScopeViews.
	sweep := filepath.Join(dir, "sweep.png")
	code, _, errs = capture(t, "measure", "--chain", chain, "--sweep-level", "10mV..1V", "--steps", "17", "--plot", sweep)
	if code != 0 || !strings.Contains(errs, "no scope views") {
		t.Errorf("long sweep: exit %d, stderr %q", code, errs)
	}
	if m, _ := filepath.Glob(filepath.Join(dir, "sweep-scope*")); len(m) != 0 || pngWidth(t, sweep) == 0 {
		t.Errorf("scope views written for a long sweep: %v", m)
	}
}

// response draws on 48 points a decade unless told otherwise: 146 from
// 20 Hz to 20 kHz, both ends included; --group-delay adds its panel to
// the figure and needs --plot.
func TestResponsePlotGrid(t *testing.T) {
	chain := measTestChain(t)
	dir := t.TempDir()
	code, out, errs := capture(t, "response", "--chain", chain, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		Curves []struct {
			Points []struct{ Hz float64 } `json:"points"`
		} `json:"curves"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	pts := rep.Curves[0].Points
	if len(pts) != 146 || pts[0].Hz != 20 || math.Abs(pts[len(pts)-1].Hz-20000) > 1e-9 {
		t.Fatalf("default grid: %d points from %g to %g Hz, want 146 from 20 Hz to 20 kHz", len(pts), pts[0].Hz, pts[len(pts)-1].Hz)
	}
	for i := 1; i < len(pts); i++ {
		// No step wider than a 48th of a decade (1e-12 for rounding).
		if r := pts[i].Hz / pts[i-1].Hz; r > math.Pow(10, 1.0/48)*(1+1e-12) {
			t.Errorf("step %d: ratio %.6f", i, r)
		}
	}
	svg := filepath.Join(dir, "r.svg")
	code, _, errs = capture(t, "response", "--chain", chain, "--set", "rc.C1=10n,22n", "--plot", svg, "--group-delay", "--quiet")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, err := os.ReadFile(svg)
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"Group delay", "Phase (unwrapped)", "rc.C1=22n", "bench test chain"} {
		if !strings.Contains(string(b), w) {
			t.Errorf("figure lacks %q", w)
		}
	}
	// A sparse grid draws, with a note that its phase may miss a turn;
	// the default grid needs none.
	code, _, errs = capture(t, "response", "--chain", chain, "--freqs", "100,1k,10k", "--plot", filepath.Join(dir, "sparse.png"))
	if code != 0 || !strings.Contains(errs, "note: the plot's phase is unwrapped from the 3 frequencies") {
		t.Errorf("sparse grid: exit %d, stderr %q", code, errs)
	}
	code, _, errs = capture(t, "response", "--chain", chain, "--plot", filepath.Join(dir, "dense.png"))
	if code != 0 || strings.Contains(errs, "note:") {
		t.Errorf("default grid: exit %d, stderr %q", code, errs)
	}
	code, _, errs = capture(t, "response", "--chain", chain, "--group-delay", "--quiet")
	if msg := strings.TrimSpace(errs); code != 2 || !strings.Contains(msg, "--plot") || strings.Contains(msg, "\n") {
		t.Errorf("--group-delay without --plot: exit %d, %q", code, msg)
	}
}

// analyze --plot draws the file's spectrogram, with --dry the take above
// it; the flags may follow the file name. Mistakes are one-line usage
// errors; a file with nothing to draw fails without leaving a picture.
func TestAnalyzePlot(t *testing.T) {
	dir := t.TempDir()
	const fs = 48000
	dry, wet, silent := filepath.Join(dir, "dry.wav"), filepath.Join(dir, "wet.wav"), filepath.Join(dir, "silent.wav")
	x := make([]float64, fs)
	for i := range x {
		x[i] = 0.3 * math.Sin(2*math.Pi*220*float64(i)/fs)
	}
	writeTestWAV(t, dry, x)
	for i := range x {
		x[i] = math.Tanh(10 * x[i])
	}
	writeTestWAV(t, wet, x)
	writeTestWAV(t, silent, make([]float64, fs))
	pic := filepath.Join(dir, "sg.png")
	code, out, errs := capture(t, "analyze", wet, "--plot", pic, "--dry", dry, "--json")
	if code != 0 || !strings.Contains(out, `"lufs"`) || !strings.Contains(errs, "plot: "+pic+" (spectrogram, dry against wet)") {
		t.Fatalf("exit %d, stderr %q, stdout %.200s", code, errs, out)
	}
	if w := pngWidth(t, pic); math.Abs(float64(w)-cmWide(18)) > 1 {
		t.Errorf("spectrogram %d px wide", w)
	}
	if code, _, errs := capture(t, "analyze", "--plot="+filepath.Join(dir, "one.svg"), wet, "-q"); code != 0 || errs != "" {
		t.Errorf("flags before the file: exit %d, %q", code, errs)
	}
	for _, tc := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{wet, "--dry", dry}, 2, "--plot"},
		{[]string{wet, "--plot"}, 2, "--plot needs"},
		{[]string{wet, "--plot", filepath.Join(dir, "x.pdf")}, 2, "x.pdf"},
		{[]string{wet, "--colour"}, 2, "--colour"},
		{[]string{silent, "--plot", filepath.Join(dir, "x.png")}, 1, "silent"},
		{[]string{wet, "--plot", filepath.Join(dir, "x.png"), "--dry", filepath.Join(dir, "none.wav")}, 1, "none.wav"},
	} {
		code, _, errs := capture(t, append([]string{"analyze"}, tc.args...)...)
		msg := strings.TrimSpace(errs)
		if code != tc.code || !strings.Contains(msg, tc.want) || strings.Contains(msg, "\n") {
			t.Errorf("analyze %v: exit %d, %q; want exit %d naming %s", tc.args, code, msg, tc.code, tc.want)
		}
	}
	if m, _ := filepath.Glob(filepath.Join(dir, "x.*")); len(m) != 0 {
		t.Errorf("failed runs left %v", m)
	}
}

// writeTestWAV writes mono 24-bit samples at 48 kHz.
func writeTestWAV(t *testing.T, path string, x []float64) {
	t.Helper()
	if err := wavio.WriteFile(path, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 24}, x); err != nil {
		t.Fatal(err)
	}
}

// ab draws its pictures by default (fig-*.png at the figures' widths,
// listed in ab.json and named in the summary), none with --no-pictures;
// the test sine's flags are checked before any work, one line each.
func TestABPictures(t *testing.T) {
	dir := t.TempDir()
	dry := abDry(t, dir)
	out := filepath.Join(dir, "set")
	base := []string{"ab", "--chain", "../../chains/fuzz-only.toml", "--in", dry, "--variant", "as built:",
		"--variant", "more fuzz: fuzz.fuzz=1", "--oversample", "1", "--segment", "0"}
	code, _, errs := capture(t, append(base, "--outdir", out, "--sine-level", "20mVpp")...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, err := os.ReadFile(filepath.Join(out, "ab.json"))
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		Pictures []struct{ File string } `json:"pictures"`
	}
	if err := json.Unmarshal(b, &m); err != nil || len(m.Pictures) != 4 {
		t.Fatalf("ab.json pictures: %v %v", m.Pictures, err)
	}
	for _, p := range m.Pictures {
		if w := pngWidth(t, filepath.Join(out, p.File)); math.Abs(float64(w)-cmWide(18)) > 1 {
			t.Errorf("%s is %d px wide", p.File, w)
		}
		if !strings.Contains(errs, p.File) {
			t.Errorf("summary does not name %s", p.File)
		}
	}
	if code, _, errs := capture(t, append(base, "--outdir", filepath.Join(dir, "none"), "--no-pictures", "-q")...); code != 0 {
		t.Fatalf("--no-pictures: exit %d: %s", code, errs)
	}
	if m, _ := filepath.Glob(filepath.Join(dir, "none", "fig-*")); len(m) != 0 {
		t.Errorf("--no-pictures wrote %v", m)
	}
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"--sine-freq", "30k"}, "--sine-freq"},
		{[]string{"--sine-level", "0"}, "--sine-level"},
		{[]string{"--sine-freq", "1k", "--no-pictures"}, "--no-pictures"},
		{[]string{"--sine-level", "1V", "--blind", "--seed", "2"}, "--blind"},
	} {
		code, _, errs := capture(t, append(append(base, "--outdir", filepath.Join(dir, "bad"), "-q"), tc.args...)...)
		msg := strings.TrimSpace(errs)
		if code != exitUsage || !strings.Contains(msg, tc.want) || strings.Contains(msg, "\n") {
			t.Errorf("ab %v: exit %d, %q; want exit 2 naming %s", tc.args, code, msg, tc.want)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "bad")); !os.IsNotExist(err) {
		t.Error("a refused set left its folder")
	}
}
