package resample

import (
	"fmt"
	"strconv"
)

// ParamError reports a constructor argument that is out of range. Op names
// the function that rejected it, Param the argument, Value its value and
// Reason what was expected.
type ParamError struct {
	Op     string
	Param  string
	Value  float64
	Reason string
}

func (e *ParamError) Error() string {
	return fmt.Sprintf("resample: %s: %s = %s %s", e.Op, e.Param,
		strconv.FormatFloat(e.Value, 'g', -1, 64), e.Reason)
}

// MaxFactor is the largest oversampling factor accepted by the constructors.
const MaxFactor = 16

func checkFactor(op string, factor int) error {
	if factor < 1 || factor > MaxFactor {
		return &ParamError{Op: op, Param: "factor", Value: float64(factor),
			Reason: "out of range, want 1 to " + strconv.Itoa(MaxFactor)}
	}
	return nil
}

func checkRate(op string, fs float64) error {
	// The NaN test is written so that NaN fails it.
	if !(fs > 0) || fs > maxRate {
		return &ParamError{Op: op, Param: "sample rate", Value: fs,
			Reason: "out of range, want a finite rate in (0, 1e7] Hz"}
	}
	return nil
}

func checkBlock(op, param string, n int) error {
	if n < 1 || n > maxBlock {
		return &ParamError{Op: op, Param: param, Value: float64(n),
			Reason: "out of range, want 1 to " + strconv.Itoa(maxBlock)}
	}
	return nil
}

const (
	maxRate  = 1e7     // Hz; far above any audio rate, keeps fs·factor finite and sane
	maxBlock = 1 << 20 // samples; bounds the buffers a constructor allocates
)

// lengthPanic reports a violated slice-length contract. Like the standard
// library's crypto/cipher, the package treats mismatched buffer lengths as a
// programming error of the caller, not as bad user data.
func lengthPanic(op, have string, got int, want string, wantN int) {
	panic(fmt.Sprintf("resample: %s: %s = %d, want %s = %d", op, have, got, want, wantN))
}
