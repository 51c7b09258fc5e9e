package analyze

import (
	"context"
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"renderchain/dsp/wavio"
)

// sine returns frames of a stereo (both channels equal) or mono sine.
func sine(amp, hz float64, fs, frames, channels int) []float64 {
	x := make([]float64, frames*channels)
	for i := 0; i < frames; i++ {
		v := amp * math.Sin(2*math.Pi*hz*float64(i)/float64(fs))
		for c := 0; c < channels; c++ {
			x[i*channels+c] = v
		}
	}
	return x
}

// TestAnalyzeSine analyses EBU Tech 3341 test case 1, a stereo 1 kHz sine
// at −23 dBFS for 20 s, which must read −23.0 ± 0.1 LUFS integrated
// (Tech 3341 Table 1; the same tolerance is applied to the momentary and
// short-term maxima of this steady signal), with a loudness range of
// 0 ± 0.1 LU (a steady signal has none, EBU Tech 3342). Levels follow from
// the sine: peak −23 dBFS, RMS −23 − 3.0103 dB, crest 3.0103 dB (√2,
// handbook), within 0.001 dB for 24-bit rounding; true peak within 0.05 dB
// of the peak (a 1 kHz sine at 48 kHz is sampled within 0.0002 dB of its
// crests, 20·log10(cos(π·1000/48000))); the 1 kHz one-third-octave band at
// −23 ± 0.05 dB re a full-scale sine with every other band at least 60 dB
// lower (Hann side lobes), and the centroid within 1 Hz of 1 kHz.
func TestAnalyzeSine(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "sine.wav")
	amp := math.Pow(10, -23.0/20)
	writeWAV(t, p, sine(amp, 1000, 48000, 20*48000, 2), 2, 48000)
	r, err := File(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"lufs", float64(r.LUFS), -23, 0.1},
		{"momentary max", float64(r.MomentaryMaxLUFS), -23, 0.1},
		{"short-term max", float64(r.ShortTermMaxLUFS), -23, 0.1},
		{"loudness range", float64(r.LoudnessRangeLU), 0, 0.1},
		{"peak", float64(r.PeakDBFS), -23, 0.001},
		{"rms", float64(r.RMSDBFS), -23 - 10*math.Log10(2), 0.001},
		{"crest", float64(r.CrestDB), 10 * math.Log10(2), 0.001},
		{"true peak", float64(r.TruePeakDBTP), -23, 0.05},
		{"centroid", float64(r.CentroidHz), 1000, 1},
		{"seconds", r.Seconds, 20, 0},
	} {
		if d := math.Abs(c.got - c.want); !(d <= c.tol) {
			t.Errorf("%s: %.4f, want %.4f ± %g", c.name, c.got, c.want, c.tol)
		}
	}
	for _, b := range r.Bands {
		if b.Hz == 1000 {
			if d := math.Abs(float64(b.DB) + 23); d > 0.05 {
				t.Errorf("1 kHz band: %.3f dB, want −23 ± 0.05", float64(b.DB))
			}
		} else if float64(b.DB) > -83 {
			t.Errorf("%g Hz band: %.1f dB, want at least 60 dB under the 1 kHz band", b.Hz, float64(b.DB))
		}
	}
	if len(r.Bands) != 30 || len(r.Notes) != 0 {
		t.Errorf("%d bands (want 30, 25 Hz to 20 kHz), notes %q", len(r.Bands), r.Notes)
	}
	t.Logf("1 kHz at −23 dBFS, stereo 20 s: %.3f LUFS, true peak %.4f dBTP, LRA %.3f LU, centroid %.2f Hz",
		float64(r.LUFS), float64(r.TruePeakDBTP), float64(r.LoudnessRangeLU), float64(r.CentroidHz))
}

// TestAnalyzeSilence checks that silence and a too-short file give valid
// JSON with null (not −Inf) levels and notes saying why.
func TestAnalyzeSilence(t *testing.T) {
	dir := t.TempDir()
	for _, tc := range []struct {
		name   string
		x      []float64
		nulls  []string
		finite []string
	}{
		{"silence", make([]float64, 48000), []string{"lufs", "true_peak_dbtp", "peak_dbfs", "rms_dbfs", "crest_db", "spectral_centroid_hz"}, nil},
		{"short", sine(0.5, 440, 48000, 9600, 1), []string{"lufs", "momentary_max_lufs", "short_term_max_lufs", "loudness_range_lu"},
			[]string{"peak_dbfs", "rms_dbfs", "true_peak_dbtp"}},
	} {
		p := filepath.Join(dir, tc.name+".wav")
		writeWAV(t, p, tc.x, 1, 48000)
		r, err := File(context.Background(), p)
		if err != nil {
			t.Fatal(err)
		}
		b, err := json.Marshal(r)
		if err != nil || !json.Valid(b) {
			t.Fatalf("%s: invalid JSON %s: %v", tc.name, b, err)
		}
		var m map[string]any
		json.Unmarshal(b, &m)
		for _, k := range tc.nulls {
			if v, ok := m[k]; !ok || v != nil {
				t.Errorf("%s: %s = %v, want null", tc.name, k, v)
			}
		}
		for _, k := range tc.finite {
			if _, ok := m[k].(float64); !ok {
				t.Errorf("%s: %s = %v, want a number", tc.name, k, m[k])
			}
		}
		if len(r.Notes) == 0 || strings.Contains(string(b), "Inf") || strings.Contains(string(b), "NaN") {
			t.Errorf("%s: notes %q, JSON %s", tc.name, r.Notes, b)
		}
	}
}

func writeWAV(t testing.TB, path string, x []float64, channels, rate int) {
	t.Helper()
	if err := wavio.WriteFile(path, wavio.Format{SampleRate: rate, Channels: channels, BitDepth: 24}, x); err != nil {
		t.Fatal(err)
	}
}
