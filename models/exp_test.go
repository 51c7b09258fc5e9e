package models

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// bigExp is exp(x) to about 240 bits, rounded to float64: the Taylor series
// (Abramowitz & Stegun 4.2.1) of x/2¹⁰, whose terms fall below 2⁻²⁵⁶ after
// 40 of them for |x| ≤ 80, squared ten times (each squaring doubles the
// relative error, 2¹⁰·2⁻²⁵⁶ in all).
func bigExp(x float64) float64 {
	return bigExpOf(new(big.Float).SetPrec(256).SetFloat64(x))
}

// bigExpOf is bigExp of a 256-bit argument (|x| ≤ 80).
func bigExpOf(x *big.Float) float64 {
	const prec = 256
	y := new(big.Float).SetPrec(prec).Set(x)
	y.SetMantExp(y, -10)
	sum := new(big.Float).SetPrec(prec).SetInt64(1)
	term := new(big.Float).SetPrec(prec).SetInt64(1)
	for k := int64(1); k <= 40; k++ {
		term.Mul(term, y)
		term.Quo(term, new(big.Float).SetPrec(prec).SetInt64(k))
		sum.Add(sum, term)
	}
	for range 10 {
		sum.Mul(sum, sum)
	}
	f, _ := sum.Float64()
	return f
}

// expReduced against exp to 240 bits (bigExp), at seeded random points of
// [−50, 80] and at the reduction's worst points (|r| largest): within the
// bound derived at expReduced, 3.4u (u = 2⁻⁵³), plus the half ulp (≤ u
// relative) of rounding the reference to float64: 4.4u.
func TestExpReducedAgainstBigFloat(t *testing.T) {
	const u = 0x1p-53
	const tol = 4.4 * u
	rng := rand.New(rand.NewPCG(12, 2))
	xs := []float64{-expFloor, expLimit, 0, 1e-300, -1e-300}
	for range 20000 {
		xs = append(xs, -expFloor+rng.Float64()*(expLimit+expFloor))
	}
	for n := -4600.0; n < 7380; n += 97 {
		xs = append(xs, (n+0.5)*math.Ln2/64)
	}
	worst, at := 0.0, 0.0
	for _, x := range xs {
		want := bigExp(x)
		if e := math.Abs(expReduced(x)-want) / want; e > worst || math.IsNaN(e) {
			worst, at = e, x
		}
	}
	t.Logf("worst relative error against 240-bit exp: %.3g (%.2f u) at x = %.17g", worst, worst/u, at)
	if !(worst <= tol) {
		t.Errorf("expReduced is off by %.3g relative at x = %.17g > %.3g", worst, at, tol)
	}
}

// expReduced against math.Exp over the range limexp uses it, [−50, 80]:
// random points (seeded), a fine grid, and the points where the reduction
// switches table entry (x = (n + ½)·ln2/64, where |r| is largest). The
// tolerance is the error bound derived at expReduced, 3.4u, plus
// math.Exp's own error of less than 1 ulp (Go's math package, from
// fdlibm's analysis), at most 2u relative: 5.4u ≈ 6.0e-16, u = 2⁻⁵³.
func TestExpReducedAgainstMathExp(t *testing.T) {
	const u = 0x1p-53
	const tol = 5.4 * u
	worst, at := 0.0, 0.0
	check := func(x float64) {
		want := math.Exp(x)
		got := expReduced(x)
		if e := math.Abs(got-want) / want; e > worst || math.IsNaN(e) {
			worst, at = e, x
		}
	}
	rng := rand.New(rand.NewPCG(12, 1))
	for range 1_000_000 {
		check(-expFloor + rng.Float64()*(expLimit+expFloor))
	}
	for x := -expFloor; x <= expLimit; x += 1.0 / 1024 {
		check(x)
	}
	for n := math.Ceil(-expFloor * 64 / math.Ln2); n*math.Ln2/64 < expLimit; n++ {
		check((n + 0.5) * math.Ln2 / 64)
		check(math.Nextafter((n+0.5)*math.Ln2/64, math.Inf(-1)))
	}
	check(-expFloor)
	check(expLimit)
	check(0)
	check(-0x1p-40)
	t.Logf("worst relative error %.3g (%.2f u) at x = %.17g", worst, worst/u, at)
	if !(worst <= tol) {
		t.Errorf("expReduced departs from math.Exp by %.3g relative at x = %.17g > %.3g", worst, at, tol)
	}
}

// The table is 2^(j/64), within half an ulp by construction; checked here
// against math.Exp2 (itself within 1 ulp, Go's math package), so within
// 1.5 ulp of it, 3u relative.
func TestExpTable(t *testing.T) {
	for j, v := range expTable {
		want := math.Exp2(float64(j) / 64)
		if e := math.Abs(v-want) / want; e > 3*0x1p-53 {
			t.Errorf("expTable[%d] = %.17g, math.Exp2 %.17g", j, v, want)
		}
	}
	if expTable[0] != 1 {
		t.Errorf("expTable[0] = %g, want exactly 1", expTable[0])
	}
}
