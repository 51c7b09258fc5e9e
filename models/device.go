package models

import (
	"math"
	"math/big"
)

// Nonlinear is a nonlinear multi-port device as the solvers see it: P ports,
// each a pair of terminals with a port voltage and a port current flowing
// into the port's positive terminal. Eval must be cheap and allocation-free;
// the solvers call it in their Newton loops.
type Nonlinear interface {
	// Ports returns the number of ports P.
	Ports() int
	// Eval writes the port currents i (len P) and the Jacobian di/dv
	// (row-major P×P) for the port voltages v (len P).
	Eval(v, i, jac []float64)
	// Limit restrains a Newton step from vold to vnew (both len P) in place,
	// so that exponentials are not overshot.
	Limit(vnew, vold []float64)
}

// MaxPortVoltage bounds the magnitude of any device port voltage a solver
// may accept, volts: no effect-pedal circuit puts a kilovolt across a
// junction, so a larger value marks a spurious root.
const MaxPortVoltage = 1e3

// physicalJunction reports whether a junction voltage v with emission
// voltage nvt is one a finite circuit current can produce: forward bias
// inside the exponential's range (below expLimit·nVt, about 2 V for a
// silicon junction) and reverse bias within MaxPortVoltage.
func physicalJunction(v, nvt float64) bool {
	return v < expLimit*nvt && v > -MaxPortVoltage
}

// expLimit is the point past which exponentials are continued linearly.
// exp(80) ≈ 5.5e34: no junction in a working circuit gets near (80·Vt ≈ 2 V
// across an ideal junction), and the linear continuation keeps Newton's
// intermediate iterates finite (the "limexp" device of circuit simulators).
const expLimit = 80.0

// limexp returns exp(x) and its derivative, continued linearly past expLimit.
//
// Below −expFloor the exponential is taken as 0: e^−50 ≈ 2e-22 is lost
// against the 1 it is always compared with (Is·(e^x − 1)), and a reverse-
// biased junction then costs no exponential at all.
func limexp(x float64) (e, de float64) {
	if x > expLimit {
		return limexpTail(x)
	}
	if x < -expFloor {
		return 0, 0
	}
	e = expReduced(x)
	return e, e
}

// expReduced is exp(x) for x in [−expFloor, expLimit], the range limexp
// passes it, by table-driven argument reduction (Tang, "Table-driven
// implementation of the exponential function in IEEE floating-point
// arithmetic", ACM TOMS 15(2), 1989): with n the integer nearest to
// x·64/ln 2, x = n·ln2/64 + r, |r| ≤ ln2/128, and
//
//	exp(x) = 2^(n>>6) · 2^((n&63)/64) · exp(r),
//
// the middle factor from a table and exp(r) from its Taylor polynomial
// of degree 5. It is about twice as fast as math.Exp, which handles the
// whole range, and small enough to be inlined.
//
// Error bound, relative, u = 2⁻⁵³ (the unit roundoff):
//   - table entries correctly rounded (computed to 200 bits): ≤ u;
//   - reduction: n·ln2Hi is exact (ln2Hi has 32 significant bits, |n| <
//     2¹³) and x − n·ln2Hi is exact (Sterbenz); with ln2Hi + ln2Lo equal
//     to ln 2 to about 85 bits, r is off by at most |n|·2⁻⁸⁵·ln2/64 +
//     u·|r| — below 10⁻²⁰ relative in exp(r);
//   - truncation: |r|⁶/6!·e^|r| ≤ (ln2/128)⁶/720·1.006 < 3.6e-17 < 0.33u;
//   - Horner evaluation: the last addition 1 + r·q rounds by ≤ u, every
//     earlier rounding is damped by |r| ≤ 0.0055: ≤ 1.03u in all;
//   - the product table·polynomial: ≤ u; the power of two is exact (the
//     result stays a normal number over the range).
//
// In all ≤ 3.4u ≈ 3.8e-16; the test checks it against math.Exp (itself
// within 1 ulp) over the range.
func expReduced(x float64) float64 {
	// Round x·64/ln2 to the nearest integer with the 1.5·2⁵² shift (exact
	// for |x·64/ln2| < 2⁵¹).
	const shift = 0x1.8p52
	nf := (x*expInvStep + shift) - shift
	n := int64(nf)
	r := (x - nf*expStepHi) - nf*expStepLo
	p := 1 + r*(1+r*(1.0/2+r*(1.0/6+r*(1.0/24+r*(1.0/120)))))
	// Times 2^(n>>6) by adding to the exponent field: exact, as the result
	// is a normal number.
	return math.Float64frombits(math.Float64bits(expTable[n&63]*p) + uint64(n>>6)<<52)
}

// The reduction constants: 64/ln 2, and ln2/64 split into a high part with
// 32 significant bits and the rest (the split of ln 2 used by fdlibm's
// exponential and by Go's math.Exp, divided by 64, which is exact).
const (
	expInvStep = 64 / math.Ln2
	expStepHi  = 6.93147180369123816490e-01 / 64
	expStepLo  = 1.90821492927058770002e-10 / 64
)

// expTable[j] = 2^(j/64), correctly rounded.
var expTable = func() (t [64]float64) {
	const prec = 200
	// 2^(1/64) by six square roots of 2, each correctly rounded at 200
	// bits, then its powers.
	s := new(big.Float).SetPrec(prec).SetInt64(2)
	for range 6 {
		s.Sqrt(s)
	}
	p := new(big.Float).SetPrec(prec).SetInt64(1)
	for j := range t {
		t[j], _ = p.Float64()
		p.Mul(p, s)
	}
	return t
}()

// logReduced is ln(x) for a positive normal x, by table-driven argument
// reduction (Tang, "Table-driven implementation of the logarithm function
// in IEEE floating-point arithmetic", ACM TOMS 16(4), 1990): with
// x = 2^e·f, f in [1, 2), and F = 1 + (j + ½)/256 the centre of the
// 256th of [1, 2) that holds f,
//
//	ln x = e·ln 2 + ln F + ln(1 + r),   r = (f − F)/F,  |r| ≤ 1/512,
//
// ln F from a table and ln(1 + r) from its Taylor polynomial of degree 5.
// The caller keeps x positive, normal and finite; it is about twice as
// fast as math.Log, which handles every input.
//
// Error bound, absolute, u = 2⁻⁵³:
//   - f − F is exact (both in [1, 2), multiples of 2⁻⁵²); r = (f − F)·(1/F)
//     with 1/F rounded is off by at most 2u relative, 2u·|r| ≤ 0.004u in
//     ln(1 + r);
//   - truncation: |r|⁶/6 ≤ 2⁻⁵⁴/6 < 0.09u; the polynomial's roundings are
//     damped by |r|: below 0.01u;
//   - e·ln2Hi is exact (32 significant bits times |e| < 2¹¹); e·ln2Lo and
//     the split's own error are below 10⁻⁶u;
//   - the table entry, correctly rounded, is off by at most half an ulp of
//     a number below ln 2: ≤ 0.5u;
//   - the two additions round by at most u times |e·ln2Hi + ln F| ≤
//     |ln x| + 0.002 and times |ln x|.
//
// In all ≤ (0.61 + 2·|ln x|)·u.
func logReduced(x float64) float64 {
	b := math.Float64bits(x)
	e := float64(int64(b>>52) - 1023)
	j := (b >> 44) & 255
	f := math.Float64frombits(b&(1<<52-1) | 1023<<52)
	r := (f - logCentre[j]) * logInvCentre[j]
	p := r * (1 + r*(-1.0/2+r*(1.0/3+r*(-1.0/4+r*(1.0/5)))))
	return (e*logLn2Hi + logTable[j]) + (e*logLn2Lo + p)
}

// The split of ln 2 used by fdlibm's logarithm and Go's math.Log: a high
// part with 32 significant bits and the rest.
const (
	logLn2Hi = 6.93147180369123816490e-01
	logLn2Lo = 1.90821492927058770002e-10
)

// logCentre[j] = 1 + (j + ½)/256 (exact), logInvCentre[j] its reciprocal
// rounded, logTable[j] its logarithm correctly rounded (computed to 200
// bits by the series ln F = 2·atanh((F − 1)/(F + 1)), Abramowitz & Stegun
// 4.1.27).
var logCentre, logInvCentre, logTable = func() (c, inv, t [256]float64) {
	const prec = 200
	for j := range c {
		c[j] = 1 + (float64(j)+0.5)/256
		inv[j] = 1 / c[j]
		F := new(big.Float).SetPrec(prec).SetFloat64(c[j])
		one := new(big.Float).SetPrec(prec).SetInt64(1)
		s := new(big.Float).SetPrec(prec).Quo(new(big.Float).SetPrec(prec).Sub(F, one),
			new(big.Float).SetPrec(prec).Add(F, one))
		s2 := new(big.Float).SetPrec(prec).Mul(s, s)
		term := new(big.Float).SetPrec(prec).Set(s)
		sum := new(big.Float).SetPrec(prec)
		// s ≤ 1/5: each term is 25 times smaller than the last; 45 terms
		// reach 2⁻²⁰⁰.
		for k := int64(0); k < 45; k++ {
			sum.Add(sum, new(big.Float).SetPrec(prec).Quo(term, new(big.Float).SetPrec(prec).SetInt64(2*k+1)))
			term.Mul(term, s2)
		}
		sum.Mul(sum, new(big.Float).SetPrec(prec).SetInt64(2))
		t[j], _ = sum.Float64()
	}
	return c, inv, t
}()

// powReduced is x^(−m) = exp(−m·ln x) for 0 < x < 2²⁰ and 0 ≤ m < 1, the
// depletion law's power, with logReduced and expReduced (|m·ln x| < 14,
// inside expReduced's range). Relative error, from the two bounds: the
// error of ln x times m, the rounding of the product (u·|y|, y = −m·ln x)
// and expReduced's 3.4u, to first order
//
//	≤ (3.4 + 0.61·m + 3·|y|)·u,
//
// below 13u ≈ 1.5e-15 wherever |y| ≤ 3: for m ≤ ½, every reverse bias
// below 400 times the built-in potential.
func powReduced(x, m float64) float64 {
	return expReduced(-m * logReduced(x))
}

const expFloor = 50.0

var expAtLimit = math.Exp(expLimit)

func limexpTail(x float64) (e, de float64) {
	return expAtLimit * (1 + x - expLimit), expAtLimit
}

// pnjlim limits the change of a junction voltage between Newton iterates, as
// in the junction limiting of classical circuit simulation (L. W. Nagel,
// UCB ERL-M520, 1975, sec. 4.3): above the critical voltage
// vcrit = nVt·ln(nVt/(√2·Is)) a step larger than 2·nVt is replaced by the
// logarithm of the step, so the diode current rather than the voltage moves
// by the linearised amount.
func pnjlim(vnew, vold, nvt, vcrit float64) float64 {
	if vnew > vcrit && math.Abs(vnew-vold) > 2*nvt {
		if vold > 0 {
			arg := 1 + (vnew-vold)/nvt
			if arg > 0 {
				return vold + nvt*math.Log(arg)
			}
			return vcrit
		}
		return nvt * math.Log(vnew/nvt)
	}
	return vnew
}

func criticalVoltage(nvt, is float64) float64 {
	return nvt * math.Log(nvt/(math.Sqrt2*is))
}

// Charged is a Nonlinear device that also stores charge on its ports:
// junction depletion and diffusion charges. Port k's charge q_k is the
// charge that has flowed into its Plus terminal, so its capacitive current
// is dq_k/dt, added to the current Eval returns. Charges is static: the
// solvers own the time discretisation (the trapezoidal rule, the bilinear
// transform every linear reactive element uses) and the per-sample state
// (last charge and last capacitive current), so a device stays a pure
// function of its port voltages. The DC solve ignores charges; the
// small-signal analyses add jω times the capacitance matrix at the
// operating point.
type Charged interface {
	Nonlinear
	// Charges writes the port charges q (len P), coulombs, and the
	// capacitance matrix dq/dv (row-major P×P), farads, for the port
	// voltages v (len P). It must be cheap and allocation-free.
	Charges(v, q, c []float64)
}
