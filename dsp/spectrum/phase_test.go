package spectrum

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

func TestDecadeGrid(t *testing.T) {
	g, err := DecadeGrid(20, 20000, PointsPerDecade)
	if err != nil {
		t.Fatal(err)
	}
	// Points 10^(k/48) for k = 63..206 (144 points) plus the two ends.
	if len(g) != 146 || g[0] != 20 || g[len(g)-1] != 20000 {
		t.Fatalf("grid has %d points from %g to %g, want 146 from 20 to 20000", len(g), g[0], g[len(g)-1])
	}
	// Round frequencies lie on the grid exactly (10^k is exact in
	// binary floating point for these k).
	for _, want := range []float64{100, 1000, 10000} {
		found := false
		for _, f := range g {
			found = found || f == want
		}
		if !found {
			t.Errorf("%g Hz is not on the grid", want)
		}
	}
	// Interior steps are the ratio 10^(1/48), to rounding (1e-12).
	r := math.Pow(10, 1.0/48)
	for i := 2; i < len(g)-1; i++ {
		if math.Abs(g[i]/g[i-1]-r) > 1e-12 {
			t.Fatalf("step %d: ratio %.15g, want %.15g", i, g[i]/g[i-1], r)
		}
	}
	// Ends that fall on grid points are not doubled.
	g2, _ := DecadeGrid(10, 1000, 10)
	if len(g2) != 21 || g2[0] != 10 || g2[20] != 1000 {
		t.Errorf("DecadeGrid(10, 1000, 10) = %d points %v", len(g2), g2)
	}
}

func TestDecadeGridErrors(t *testing.T) {
	for _, tc := range []struct {
		lo, hi float64
		n      int
		arg    string
	}{
		{0, 100, 10, "lo"}, {math.NaN(), 100, 10, "lo"}, {100, 100, 10, "hi"}, {100, math.Inf(1), 10, "hi"},
		{10, 100, 0, "perDecade"}, {1e-300, 1e300, 10000, "perDecade"},
	} {
		_, err := DecadeGrid(tc.lo, tc.hi, tc.n)
		var e *Error
		if !errors.As(err, &e) || e.Arg != tc.arg || !errors.Is(err, ErrInvalid) {
			t.Errorf("DecadeGrid(%g, %g, %d) = %v, want ErrInvalid on %s", tc.lo, tc.hi, tc.n, err, tc.arg)
		}
	}
}

// The claim behind PointsPerDecade: the straight segments between grid
// points stay within the closed-form bounds g”·h²/8 of the true curve,
// wherever the corner falls. Corners are drawn at random (seeded) across
// the grid, as a knob would move them. Sections (closed forms, textbook):
// first-order low-pass 1/(1 + jf/fc) and high-pass (jf/fc)/(1 + jf/fc);
// second-order low-pass 1/(1 − x² + jx/Q), x = f/f0. Bounds (from the
// curvature maxima worked out in PointsPerDecade's comment): first order
// 4.343·h²/8 dB and 14.32°·h²/8; second order 4.343·Q²·h² dB and
// 0.045·Q² degrees.
func TestGridChordError(t *testing.T) {
	h := math.Ln10 / PointsPerDecade
	type section struct {
		name       string
		q          float64
		h          func(x float64) complex128
		dbMax, deg float64
	}
	first := []section{
		{"low-pass 1st", 0, func(x float64) complex128 { return 1 / complex(1, x) }, 4.343 * h * h / 8, 14.33 * h * h / 8},
		{"high-pass 1st", 0, func(x float64) complex128 { return complex(0, x) / complex(1, x) }, 4.343 * h * h / 8, 14.33 * h * h / 8},
	}
	for _, q := range []float64{0.5, 0.707, 1, 2, 3} {
		first = append(first, section{"low-pass 2nd", q, func(x float64) complex128 { return 1 / complex(1-x*x, x/q) },
			4.343 * q * q * h * h, 0.045 * q * q})
	}
	grid, err := DecadeGrid(20, 20000, PointsPerDecade)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(14, 48))
	for _, s := range first {
		worstDB, worstDeg := 0.0, 0.0
		for trial := 0; trial < 40; trial++ {
			fc := 100 * math.Pow(40, rng.Float64()) // 100 Hz to 4 kHz
			db := func(f float64) float64 { return 20 * math.Log10(cmplx.Abs(s.h(f/fc))) }
			deg := func(f float64) float64 { return cmplx.Phase(s.h(f/fc)) * 180 / math.Pi }
			for i := 1; i < len(grid); i++ {
				f0, f1 := grid[i-1], grid[i]
				d0, d1 := db(f0), db(f1)
				p0, p1 := deg(f0), deg(f1)
				for j := 1; j < 8; j++ {
					a := float64(j) / 8
					f := math.Exp((1-a)*math.Log(f0) + a*math.Log(f1))
					worstDB = math.Max(worstDB, math.Abs(db(f)-((1-a)*d0+a*d1)))
					worstDeg = math.Max(worstDeg, math.Abs(deg(f)-((1-a)*p0+a*p1)))
				}
			}
		}
		if worstDB > s.dbMax || worstDeg > s.deg {
			t.Errorf("%s Q=%g: chord error %.5f dB, %.5f°; bounds %.5f dB, %.5f°", s.name, s.q, worstDB, worstDeg, s.dbMax, s.deg)
		}
	}
}

// Three first-order low-pass sections in cascade: phase −3·atan(f/fc)
// (closed form), which runs from 0 to nearly −270° and crosses −180°.
// Wrapped into (−180°, 180°] it jumps by 360°; unwrapped it must equal
// the closed form to rounding (1e-9°).
func TestUnwrapCascade(t *testing.T) {
	grid, _ := DecadeGrid(10, 100e3, PointsPerDecade)
	const fc = 1000.0
	want := make([]float64, len(grid))
	wrapped := make([]float64, len(grid))
	jumps := 0
	for i, f := range grid {
		h := cmplx.Pow(1/complex(1, f/fc), 3)
		want[i] = -3 * math.Atan(f/fc) * 180 / math.Pi
		wrapped[i] = cmplx.Phase(h) * 180 / math.Pi
		if i > 0 && math.Abs(wrapped[i]-wrapped[i-1]) > 180 {
			jumps++
		}
	}
	if jumps != 1 {
		t.Fatalf("test data: %d wraps, want 1 (the −180° crossing)", jumps)
	}
	got := UnwrapDegrees(nil, wrapped)
	for i := range got {
		if math.Abs(got[i]-want[i]) > 1e-9 {
			t.Fatalf("at %g Hz unwrapped %.12f°, closed form %.12f°", grid[i], got[i], want[i])
		}
	}
	// In place, and with a gap: the gap stays, the rest still unwraps.
	wrapped[40] = math.NaN()
	UnwrapDegrees(wrapped, wrapped)
	for i := range wrapped {
		if i == 40 {
			if !math.IsNaN(wrapped[i]) {
				t.Error("the gap was filled")
			}
			continue
		}
		if math.Abs(wrapped[i]-want[i]) > 1e-9 {
			t.Fatalf("in place, at %g Hz: %.12f°, want %.12f°", grid[i], wrapped[i], want[i])
		}
	}
}

func TestUnwrapTable(t *testing.T) {
	for _, tc := range []struct {
		name    string
		in, out []float64
	}{
		{"empty", nil, []float64{}},
		{"first value brought into (−180, 180]", []float64{540, 530}, []float64{180, 170}},
		{"rising through +180", []float64{170, -175, -160}, []float64{170, 185, 200}},
		{"exactly 180 apart counts as +180", []float64{0, 180, 0}, []float64{0, 180, 360}},
		{"leading NaN", []float64{math.NaN(), -190}, []float64{math.NaN(), 170}},
	} {
		got := UnwrapDegrees(nil, tc.in)
		if len(got) != len(tc.out) {
			t.Errorf("%s: %v, want %v", tc.name, got, tc.out)
			continue
		}
		for i := range got {
			if !(got[i] == tc.out[i] || math.IsNaN(got[i]) && math.IsNaN(tc.out[i])) {
				t.Errorf("%s: %v, want %v", tc.name, got, tc.out)
				break
			}
		}
	}
}

// Group delay of a first-order low-pass, closed form
// τ(f) = (1/ωc)/(1 + (f/fc)²), and of a cascade of two (twice that).
// Tolerance: the three-point formula's truncation bound h²/6·max|φ”'|/ω
// with max|φ”'| = 0.5 rad per section per neper³ (the third derivative
// of atan(e^u) at u = 0), times the number of sections, plus 10⁻¹² s of
// rounding; the end points use one-sided formulas whose bound is twice
// the central one (h²/3·max|φ”'|).
func TestGroupDelayFirstOrder(t *testing.T) {
	grid, _ := DecadeGrid(20, 20000, PointsPerDecade)
	const fc = 700.0
	wc := 2 * math.Pi * fc
	h := math.Ln10 / PointsPerDecade
	for _, sections := range []int{1, 2} {
		deg := make([]float64, len(grid))
		for i, f := range grid {
			deg[i] = cmplx.Phase(cmplx.Pow(1/complex(1, f/fc), complex(float64(sections), 0))) * 180 / math.Pi
		}
		UnwrapDegrees(deg, deg)
		tau, err := GroupDelay(grid, deg)
		if err != nil {
			t.Fatal(err)
		}
		for i, f := range grid {
			want := float64(sections) / wc / (1 + (f/fc)*(f/fc))
			bound := float64(sections) * h * h / 6 * 0.5 / (2 * math.Pi * f)
			if i == 0 || i == len(grid)-1 {
				bound *= 2
			}
			if math.Abs(tau[i]-want) > bound+1e-12 {
				t.Fatalf("%d sections at %g Hz: τ = %.9g s, closed form %.9g s (bound %.3g s)", sections, f, tau[i], want, bound)
			}
		}
	}
}

func TestGroupDelayErrors(t *testing.T) {
	for _, tc := range []struct {
		name    string
		hz, deg []float64
		want    error
	}{
		{"lengths differ", []float64{1, 2}, []float64{0}, ErrInvalid},
		{"one point", []float64{1}, []float64{0}, ErrShort},
		{"not increasing", []float64{1, 3, 2}, []float64{0, 0, 0}, ErrInvalid},
		{"zero frequency", []float64{0, 1, 2}, []float64{0, 0, 0}, ErrInvalid},
	} {
		if _, err := GroupDelay(tc.hz, tc.deg); !errors.Is(err, tc.want) {
			t.Errorf("%s: %v, want %v", tc.name, err, tc.want)
		}
	}
}

// Any finite input unwraps to finite values whose steps are within
// (−180°, 180°] and which differ from the input by whole turns.
func FuzzUnwrapDegrees(f *testing.F) {
	f.Add(170.0, -175.0, 900.0, -1e6)
	f.Fuzz(func(t *testing.T, a, b, c, d float64) {
		in := []float64{a, b, c, d}
		for _, v := range in {
			if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > 1e9 {
				return
			}
		}
		out := UnwrapDegrees(nil, in)
		for i := range out {
			turns := (out[i] - in[i]) / 360
			if math.Abs(turns-math.Round(turns)) > 1e-6 {
				t.Fatalf("%v → %v: element %d moved by %g turns", in, out, i, turns)
			}
			if i > 0 {
				if d := out[i] - out[i-1]; d <= -180-1e-6 || d > 180+1e-6 {
					t.Fatalf("%v → %v: step %d is %g°", in, out, i, d)
				}
			}
		}
	})
}
