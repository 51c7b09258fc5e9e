package wdf

import (
	"math"
	"testing"
)

// The root's Newton matrix J = I − K·Jf against central differences of
// the residual F(v) = v − p − K·f(v) itself, on the two-transistor stage
// at several operating points (idle, and along a driven waveform, so that
// devices are in their active, saturated and cut-off regions). Step h =
// 1e-7 V: the truncation error h²·|F”'|/6 (|F”'| ≲ |K|·Is·e^x/Vt³) and
// the rounding error ε·|F|/h both stay below 1e-6 of J's scale, the
// tolerance used.
func TestNewtonMatrixAgainstCentralDifferences(t *testing.T) {
	s, _ := twoTransistor().compile(t, 96000)
	checkNewtonMatrix(t, s)
}

// checkNewtonMatrix drives s with a 700 Hz sine and, every 250 samples,
// checks buildJacobian's J against central differences of the residual
// F(v) = v − p − K·f(v) (step and tolerance as above).
func checkNewtonMatrix(t *testing.T, s *Solver) {
	t.Helper()
	k := s.k
	residual := func(v []float64) []float64 {
		save := append([]float64(nil), s.v...)
		copy(s.v, v)
		s.evalDevices()
		r := make([]float64, k)
		for i := 0; i < k; i++ {
			r[i] = v[i] - s.p[i] - dot(s.kk[i*k:i*k+k], s.i)
		}
		copy(s.v, save)
		s.evalDevices()
		return r
	}
	checked := 0
	for n := 0; n < 2000; n++ {
		s.Tick(0.4 * math.Sin(2*math.Pi*700*float64(n)/96000))
		if n%250 != 0 {
			continue
		}
		v := append([]float64(nil), s.v...)
		s.evalDevices()
		s.buildJacobian()
		scale := 0.0
		for _, x := range s.jac[:k*k] {
			scale = math.Max(scale, math.Abs(x))
		}
		const h = 1e-7
		for c := 0; c < k; c++ {
			vp := append([]float64(nil), v...)
			vm := append([]float64(nil), v...)
			vp[c] += h
			vm[c] -= h
			fp, fm := residual(vp), residual(vm)
			for r := 0; r < k; r++ {
				num := (fp[r] - fm[r]) / (2 * h)
				if d := math.Abs(num - s.jac[r*k+c]); d > 1e-6*scale {
					t.Errorf("sample %d: J[%d][%d] = %.9g, central difference %.9g", n, r, c, s.jac[r*k+c], num)
				}
			}
		}
		checked++
	}
	if checked < 8 {
		t.Fatalf("checked %d points", checked)
	}
}
