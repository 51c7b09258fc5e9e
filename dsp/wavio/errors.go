package wavio

import (
	"errors"
	"strconv"
	"strings"
)

// Sentinel errors. Every error returned for bad input wraps exactly one of
// them, so callers can classify faults with errors.Is.
var (
	// ErrEmpty reports a stream with no bytes at all.
	ErrEmpty = errors.New("empty input")
	// ErrNotWAVE reports a stream that is not a RIFF container of form WAVE.
	ErrNotWAVE = errors.New("not a RIFF/WAVE stream")
	// ErrNoFmt reports a WAVE stream without a "fmt " chunk.
	ErrNoFmt = errors.New("missing fmt chunk")
	// ErrNoData reports a WAVE stream without a "data" chunk.
	ErrNoData = errors.New("missing data chunk")
	// ErrTruncated reports a stream that ends before its declared data does.
	ErrTruncated = errors.New("truncated data")
	// ErrUnsupported reports a well-formed stream in an encoding, bit depth,
	// channel count or sample rate this package does not handle.
	ErrUnsupported = errors.New("unsupported encoding")
	// ErrBadFormat reports inconsistent or impossible header fields (zero
	// channels or rate, block-align mismatch, short fmt chunk, ...).
	ErrBadFormat = errors.New("invalid format fields")
	// ErrNonFinite reports a NaN or infinite sample, on reading float data
	// or on writing any format. It is wrapped by *SampleError.
	ErrNonFinite = errors.New("non-finite sample")
	// ErrPartialFrame reports a Writer.Write whose length is not a multiple
	// of the channel count.
	ErrPartialFrame = errors.New("partial frame")
	// ErrTooLarge reports a write that would overflow the 32-bit RIFF sizes.
	ErrTooLarge = errors.New("output exceeds 4 GiB RIFF limit")
	// ErrClosed reports use of a Writer after Close, or of an Output after
	// Commit or Abort.
	ErrClosed = errors.New("already closed")
	// ErrOverLimit reports a float input sample beyond the Reader's level
	// bound (DefaultFloatLimit, +24 dBFS, unless changed with
	// SetFloatLimit). It is wrapped by *SampleError.
	ErrOverLimit = errors.New("sample beyond the accepted level")
	// ErrRange reports a finite sample the output format cannot hold (a
	// float64 value beyond the float32 range). It is wrapped by
	// *SampleError.
	ErrRange = errors.New("sample beyond the output format's range")
	// ErrFrameCount reports a stream writer given more or fewer frames
	// than its header announced.
	ErrFrameCount = errors.New("frame count differs from the header")
)

// FormatError describes a fault in the structure or header of a WAVE stream,
// or an unusable Format given to NewWriter.
type FormatError struct {
	Path   string // file name when known (set by Open), else ""
	Offset int64  // byte offset in the stream where the fault was found; -1 if none
	Kind   error  // one of the sentinel errors above
	Reason string // one-line detail
}

func (e *FormatError) Error() string {
	var b strings.Builder
	b.WriteString("wavio: ")
	if e.Path != "" {
		b.WriteString(e.Path)
		b.WriteString(": ")
	}
	if e.Offset >= 0 {
		b.WriteString("offset ")
		b.WriteString(strconv.FormatInt(e.Offset, 10))
		b.WriteString(": ")
	}
	if e.Kind != nil {
		b.WriteString(e.Kind.Error())
	}
	if e.Reason != "" {
		b.WriteString(": ")
		b.WriteString(e.Reason)
	}
	return oneLine(b.String())
}

// Unwrap returns Kind, so errors.Is(err, ErrTruncated) and the like work.
func (e *FormatError) Unwrap() error { return e.Kind }

// SampleError reports a sample that cannot be taken: non-finite (NaN or
// ±Inf, Kind ErrNonFinite), a float input sample beyond the Reader's level
// bound (ErrOverLimit), or a value the output format cannot hold
// (ErrRange).
type SampleError struct {
	Path    string  // file name when known, else ""
	Frame   int64   // zero-based frame index in the stream
	Channel int     // zero-based channel within the frame
	Value   float64 // the offending value
	Kind    error   // ErrNonFinite (also when nil), ErrOverLimit or ErrRange
	Reason  string  // one-line detail
}

func (e *SampleError) kind() error {
	if e.Kind == nil {
		return ErrNonFinite
	}
	return e.Kind
}

func (e *SampleError) Error() string {
	var b strings.Builder
	b.WriteString("wavio: ")
	if e.Path != "" {
		b.WriteString(e.Path)
		b.WriteString(": ")
	}
	b.WriteString("frame ")
	b.WriteString(strconv.FormatInt(e.Frame, 10))
	b.WriteString(" channel ")
	b.WriteString(strconv.Itoa(e.Channel))
	b.WriteString(": ")
	b.WriteString(e.kind().Error())
	b.WriteString(" (")
	bits := 64
	if float64(float32(e.Value)) == e.Value {
		bits = 32 // the shortest form that reads back as this binary32 value: 1e+30, not 1.0000000150474662e+30
	}
	b.WriteString(strconv.FormatFloat(e.Value, 'g', -1, bits))
	b.WriteString(")")
	if e.Reason != "" {
		b.WriteString(": ")
		b.WriteString(e.Reason)
	}
	return oneLine(b.String())
}

// Unwrap returns Kind (ErrNonFinite when unset).
func (e *SampleError) Unwrap() error { return e.kind() }

func fmtErr(off int64, kind error, reason string) *FormatError {
	return &FormatError{Offset: off, Kind: kind, Reason: reason}
}

// oneLine keeps messages on one line even if a reason quotes bytes from the
// input.
func oneLine(s string) string {
	if !strings.ContainsAny(s, "\r\n") {
		return s
	}
	return strings.NewReplacer("\r", `\r`, "\n", `\n`).Replace(s)
}

// withPath returns err with Path set when err is one of this package's error
// types; other errors are returned unchanged.
func withPath(err error, path string) error {
	var fe *FormatError
	if errors.As(err, &fe) && fe.Path == "" {
		c := *fe
		c.Path = path
		return &c
	}
	var se *SampleError
	if errors.As(err, &se) && se.Path == "" {
		c := *se
		c.Path = path
		return &c
	}
	return err
}
