package measure

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"renderchain/models"
)

// On a linear chain the swept-sine linear response equals the small-signal
// one: within 0.1 dB from 50 Hz to 10 kHz (the tolerance), the gap
// being the bilinear frequency warp of the solver; against the small-signal
// response at the warped frequency, within 0.01 dB (the rate converter's
// passband ripple bound) and 0.1°.
func TestSweptLinearMatchesSmallSignal(t *testing.T) {
	ch := loadChain(t, "rc-bandpass")
	freqs := LogGrid(50, 10000, 31)
	curves, info, err := Swept(context.Background(), ch, freqs, SweptOptions{Amplitude: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	ac, err := SmallSignal(ch, freqs, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	wf := make([]float64, len(freqs))
	for i, f := range freqs {
		wf[i] = warped(f, internalFs)
	}
	acw, err := SmallSignal(ch, wf, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	h1 := curves[0]
	if h1.Harmonic != 1 || len(h1.Points) != len(freqs) {
		t.Fatalf("first curve: harmonic %d with %d points, want 1 with %d", h1.Harmonic, len(h1.Points), len(freqs))
	}
	var worst, worstWarped, worstDeg float64
	for i := range freqs {
		worst = math.Max(worst, math.Abs(float64(h1.Points[i].DB-ac[i].DB)))
		worstWarped = math.Max(worstWarped, math.Abs(float64(h1.Points[i].DB-acw[i].DB)))
		worstDeg = math.Max(worstDeg, math.Abs(float64(h1.Points[i].Deg-acw[i].Deg)))
	}
	t.Logf("swept vs small-signal: worst %.4f dB; vs warped small-signal: worst %.2e dB, %.2e°; L = %.3f s, H1 resolution %.2f Hz",
		worst, worstWarped, worstDeg, info.LS, h1.ResolutionHz)
	if worst > 0.1 {
		t.Errorf("swept vs small-signal: worst %.4f dB, want within 0.1 dB", worst)
	}
	if worstWarped > rippleLimit || worstDeg > 0.1 {
		t.Errorf("swept vs warped small-signal: worst %.4f dB, %.3f°; want within %g dB and 0.1°", worstWarped, worstDeg, rippleLimit)
	}
	// A linear circuit has no harmonic responses: below −80 dBc from
	// 100 Hz up (the windows' leakage from the linear response's long
	// low-frequency tail sets the floor below that).
	for _, c := range curves[1:] {
		for _, p := range c.Points {
			if p.Hz >= 100 && float64(*p.DBc) > -80 {
				t.Errorf("H%d at %.0f Hz: %.1f dBc, want below −80 dBc", c.Harmonic, p.Hz, float64(*p.DBc))
			}
		}
	}
}

// The synchronized sweep's harmonic responses against stepped sine
// measurements of the same clipper at the same level: H3 and H5 within
// 0.05 dB. For a memoryless nonlinearity the two are the same quantity
// (Farina 2000; Novák et al. 2010); this clipper's memory (10 kΩ with 1 nF,
// a 16 kHz corner) is small at these frequencies, and the tolerance leaves
// room for the windows' leakage (0.01 dB seen at 100 Hz). Its even
// responses stay below −60 dBc (half-wave symmetry).
func TestSweptHarmonicsMatchStepped(t *testing.T) {
	ch := loadChain(t, "clipper")
	freqs := []float64{100, 300, 1000}
	const amp = 1.0
	curves, _, err := Swept(context.Background(), ch, freqs, SweptOptions{Amplitude: amp, Orders: 5})
	if err != nil {
		t.Fatal(err)
	}
	if len(curves) != 5 {
		t.Fatalf("%d curves, want 5", len(curves))
	}
	for _, f := range freqs {
		r, err := Sine(context.Background(), ch, f, amp, Options{})
		if err != nil {
			t.Fatal(err)
		}
		for _, h := range []int{2, 3, 4, 5} {
			p := curves[h-1].at(f)
			if p == nil {
				t.Errorf("H%d has no point at %g Hz", h, f)
				continue
			}
			swept := float64(*p.DBc)
			stepped := harmonicDBc(r, h)
			if h%2 == 0 {
				if swept > -60 {
					t.Errorf("H%d at %g Hz: %.1f dBc, want below −60 dBc", h, f, swept)
				}
				continue
			}
			t.Logf("H%d at %g Hz: swept %.3f dBc, stepped %.3f dBc", h, f, swept, stepped)
			if math.Abs(swept-stepped) > 0.05 {
				t.Errorf("H%d at %g Hz: swept %.3f dBc, stepped %.3f dBc; want within 0.05 dB", h, f, swept, stepped)
			}
		}
	}
}

func TestSweptBadInput(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	tests := []struct {
		freqs []float64
		opt   SweptOptions
		want  string
	}{
		{[]float64{1000}, SweptOptions{}, "amplitude"},
		{[]float64{1000, 23600}, SweptOptions{Amplitude: 0.1}, "Nyquist"},
		{[]float64{3, 1000}, SweptOptions{Amplitude: 0.1}, "5 Hz"},
		// Library errors name the option's field; the command maps it to
		// its flag.
		{[]float64{1000}, SweptOptions{Amplitude: 0.1, Orders: 11}, `orders "11"`},
		{[]float64{1000}, SweptOptions{Amplitude: 0.1, Duration: 0.1}, `duration "0.1s"`},
		{[]float64{1000}, SweptOptions{Amplitude: 0.1, Probe: "rc.zz"}, `"rc.zz"`},
	}
	for _, tc := range tests {
		_, _, err := Swept(context.Background(), ch, tc.freqs, tc.opt)
		var fe *models.FieldError
		if !errors.As(err, &fe) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("Swept(%v, %+v) = %v; want an *models.FieldError naming %s", tc.freqs, tc.opt, err, tc.want)
		}
	}
}

// The window rises and falls as documented and is 1 in between.
func TestSweptWindow(t *testing.T) {
	w := cutWindow{pre: 100, post: 400}
	for _, tc := range []struct{ tau, want float64 }{
		{-101, 0}, {-100, 0}, {-75, 0.5}, {-50, 1}, {0, 1}, {300, 1}, {350, 0.5}, {400, 0}, {401, 0},
	} {
		if got := w.at(tc.tau); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("window(%g) = %g, want %g", tc.tau, got, tc.want)
		}
	}
}
