package models

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// bigLog is ln(x) to about 250 bits for a positive normal x: with
// x = 2^e·f, f in [1, 2), ln x = e·ln 2 + ln f, each logarithm by the
// series ln y = 2·atanh((y − 1)/(y + 1)) = 2·Σ s^(2k+1)/(2k+1)
// (Abramowitz & Stegun 4.1.27), s ≤ 1/3, whose terms fall by 9 or more
// each: 90 terms reach 2⁻²⁸⁰.
func bigLog(x float64) *big.Float {
	const prec = 256
	frac, e := math.Frexp(x) // x = frac·2^e, frac in [½, 1)
	f := new(big.Float).SetPrec(prec).SetFloat64(2 * frac)
	lnf := bigAtanhLog(f)
	ln2 := new(big.Float).SetPrec(prec).Mul(bigLn2, new(big.Float).SetPrec(prec).SetInt64(int64(e-1)))
	return lnf.Add(lnf, ln2)
}

var bigLn2 = bigAtanhLog(new(big.Float).SetPrec(256).SetInt64(2))

func bigAtanhLog(y *big.Float) *big.Float {
	const prec = 256
	one := new(big.Float).SetPrec(prec).SetInt64(1)
	s := new(big.Float).SetPrec(prec).Quo(new(big.Float).SetPrec(prec).Sub(y, one), new(big.Float).SetPrec(prec).Add(y, one))
	s2 := new(big.Float).SetPrec(prec).Mul(s, s)
	term := new(big.Float).SetPrec(prec).Set(s)
	sum := new(big.Float).SetPrec(prec)
	for k := int64(0); k < 90; k++ {
		sum.Add(sum, new(big.Float).SetPrec(prec).Quo(term, new(big.Float).SetPrec(prec).SetInt64(2*k+1)))
		term.Mul(term, s2)
	}
	return sum.Mul(sum, new(big.Float).SetPrec(prec).SetInt64(2))
}

// logPoints are seeded random points over the range the depletion law
// hands logReduced, (0.05, 2²⁰), denser near 1 where ln x is small, and
// the points where the reduction's table entry changes (|r| largest);
// 2n random points.
func logPoints(n int) []float64 {
	rng := rand.New(rand.NewPCG(12, 3))
	xs := []float64{0.5, 1, 2, math.Nextafter(1, 0), math.Nextafter(1, 2), 0x1p20 - 1, 0.05}
	for range n {
		xs = append(xs, math.Exp(-3+rng.Float64()*(20*math.Ln2+3)))
		xs = append(xs, 0.5+rng.Float64()*1.5)
	}
	for j := 0; j < 256; j++ {
		f := 1 + float64(j)/256
		xs = append(xs, f, math.Nextafter(f, 0)/2, f*8)
	}
	return xs
}

// logReduced against ln to 250 bits (bigLog): the absolute error is
// within the bound derived at logReduced, (0.61 + 2·|ln x|)·u, plus the
// rounding of the reference to float64 (used only for the bound's |ln x|:
// a margin of u·|ln x|), u = 2⁻⁵³.
func TestLogReducedAgainstBigFloat(t *testing.T) {
	const u = 0x1p-53
	worst, at := 0.0, 0.0
	for _, x := range logPoints(3000) {
		ref := bigLog(x)
		want, _ := ref.Float64()
		got := new(big.Float).SetPrec(256).SetFloat64(logReduced(x))
		d, _ := got.Sub(got, ref).Float64()
		tol := (0.61 + 3*math.Abs(want)) * u
		if e := math.Abs(d) / tol; e > worst || math.IsNaN(e) {
			worst, at = e, x
		}
	}
	t.Logf("worst error %.3f of the bound, at x = %.17g", worst, at)
	if !(worst <= 1) {
		t.Errorf("logReduced exceeds its bound (%.3f of it) at x = %.17g", worst, at)
	}
}

// logReduced against math.Log over the same points: the bound above plus
// math.Log's own error of less than 1 ulp (Go's math package, fdlibm's
// analysis), at most 2u·|ln x|: (0.61 + 4·|ln x|)·u.
func TestLogReducedAgainstMathLog(t *testing.T) {
	const u = 0x1p-53
	for _, x := range logPoints(20000) {
		want := math.Log(x)
		tol := (0.61 + 4*math.Abs(want)) * u
		if d := math.Abs(logReduced(x) - want); !(d <= tol) {
			t.Fatalf("logReduced(%.17g) = %.17g, math.Log %.17g: off by %.3g > %.3g", x, logReduced(x), want, d, tol)
		}
	}
}

// depletionGradings are the grading exponents the law is checked at: the
// textbook abrupt (½) and linearly graded (⅓) junctions, the 0.33 of the
// presets, and others across [0, 1).
var depletionGradings = []float64{0.05, 0.2, 0.33, 1.0 / 3, 0.4, 0.45, 0.5, 0.6, 0.75, 0.9, 0.99}

// powReduced against x^(−m) to 250 bits (exp of m·bigLog by bigExpOf)
// over the range the depletion law uses (x = 1 − v/Vj from 1 − FC = 0.05
// up to 2²⁰): within its bound (3.4 + 0.61·m + 3·|y|)·u, y = −m·ln x,
// plus the rounding of the reference to float64 (u).
func TestPowReducedAgainstBigFloat(t *testing.T) {
	const u = 0x1p-53
	xs := logPoints(500)
	worst, atX, atM := 0.0, 0.0, 0.0
	for _, m := range depletionGradings {
		for _, x := range xs {
			y := bigLog(x)
			y.Mul(y, new(big.Float).SetPrec(256).SetFloat64(-m))
			want := bigExpOf(y)
			yf, _ := y.Float64()
			tol := (4.4 + 0.61*m + 3*math.Abs(yf)) * u
			if e := math.Abs(powReduced(x, m)-want) / want / tol; e > worst || math.IsNaN(e) {
				worst, atX, atM = e, x, m
			}
		}
	}
	t.Logf("worst error %.3f of the bound, at x = %.17g, m = %g", worst, atX, atM)
	if !(worst <= 1) {
		t.Errorf("powReduced exceeds its bound (%.3f of it) at x = %.17g, m = %g", worst, atX, atM)
	}
}

// powReduced against math.Pow(x, −m): the bound above plus math.Pow's own
// error, taken as 2 ulps (it is not documented; its log and exp steps
// carry extra precision: from memory), 4u relative.
func TestPowReducedAgainstMathPow(t *testing.T) {
	const u = 0x1p-53
	worst := 0.0
	for _, m := range depletionGradings {
		for _, x := range logPoints(20000) {
			want := math.Pow(x, -m)
			y := m * math.Log(x)
			tol := (7.4 + 0.61*m + 3*math.Abs(y)) * u
			e := math.Abs(powReduced(x, m)-want) / want
			if !(e <= tol) {
				t.Fatalf("powReduced(%.17g, %g) = %.17g, math.Pow %.17g: off by %.3g > %.3g", x, m, powReduced(x, m), want, e, tol)
			}
			worst = max(worst, e/u)
		}
	}
	t.Logf("worst relative error against math.Pow %.2f u", worst)
}

// The tables: the centres exact, the reciprocals within half an ulp, and
// the logarithms against math.Log (within 1 ulp of ln, so within 1.5 ulp
// of the correctly rounded entry; entries are below ln 2, so an ulp is at
// most u).
func TestLogTables(t *testing.T) {
	const u = 0x1p-53
	for j := range logTable {
		c := logCentre[j]
		if c != 1+(float64(j)+0.5)/256 {
			t.Fatalf("logCentre[%d] = %.17g", j, c)
		}
		if e := math.Abs(logInvCentre[j]*c - 1); e > u {
			t.Errorf("logInvCentre[%d]·F − 1 = %.3g", j, e)
		}
		if d := math.Abs(logTable[j] - math.Log(c)); d > 1.5*u {
			t.Errorf("logTable[%d] = %.17g, math.Log %.17g", j, logTable[j], math.Log(c))
		}
	}
}
