package spectrum

import (
	"errors"
	"strconv"
	"strings"
)

// Sentinel causes carried by *Error. Test for them with errors.Is.
var (
	// ErrNonFinite reports a NaN or infinite sample or parameter.
	ErrNonFinite = errors.New("non-finite value")
	// ErrInvalid reports a parameter outside its documented range.
	ErrInvalid = errors.New("invalid argument")
	// ErrShort reports a record too short for the requested analysis.
	ErrShort = errors.New("record too short")
	// ErrNotCoherent reports a record that does not hold a whole number
	// of cycles when MethodBins was requested.
	ErrNotCoherent = errors.New("record is not coherent")
	// ErrIllConditioned reports a least-squares fit whose normal
	// equations cannot be solved reliably.
	ErrIllConditioned = errors.New("ill-conditioned fit")
)

// Error describes bad input: which operation, which argument and, for a
// per-sample fault, which sample.
type Error struct {
	Op     string // operation, e.g. "Analyze" or "LTAS.Write"
	Arg    string // argument or field, e.g. "x" or "Options.MaxOrder"
	Index  int    // sample index for a per-sample fault, otherwise -1
	Err    error  // one of the Err* sentinels
	Detail string // short detail, may be empty
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString("spectrum: ")
	b.WriteString(e.Op)
	b.WriteString(": ")
	b.WriteString(e.Arg)
	if e.Index >= 0 {
		b.WriteByte('[')
		b.WriteString(strconv.Itoa(e.Index))
		b.WriteByte(']')
	}
	b.WriteString(": ")
	b.WriteString(e.Err.Error())
	if e.Detail != "" {
		b.WriteString(" (")
		b.WriteString(e.Detail)
		b.WriteByte(')')
	}
	return b.String()
}

// Unwrap returns the sentinel cause.
func (e *Error) Unwrap() error { return e.Err }

func argError(op, arg string, err error, detail string) *Error {
	return &Error{Op: op, Arg: arg, Index: -1, Err: err, Detail: detail}
}

// checkFinite returns the index of the first NaN or infinite sample in x,
// or -1.
func checkFinite(x []float64) int {
	for i, v := range x {
		// v-v is NaN for ±Inf and NaN, 0 otherwise.
		if v-v != 0 {
			return i
		}
	}
	return -1
}

func sampleError(op string, x []float64, i int) *Error {
	return &Error{Op: op, Arg: "x", Index: i, Err: ErrNonFinite,
		Detail: strconv.FormatFloat(x[i], 'g', -1, 64)}
}

func finitePositive(v float64) bool { return v > 0 && v-v == 0 }
