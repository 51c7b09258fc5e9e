package wavio

import (
	"bytes"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// f32 and f64 are IEEE 754-2008 binary32 and binary64 little-endian bytes.
func f32(v ...float32) []byte {
	var b []byte
	for _, x := range v {
		b = append(b, le32(math.Float32bits(x))...)
	}
	return b
}

func f64(v ...float64) []byte {
	var b []byte
	for _, x := range v {
		b = append(b, le64(math.Float64bits(x))...)
	}
	return b
}

// The bound is +24 dBFS: 10^(24/20) (the definition of the decibel for an
// amplitude ratio, 20·log10). Tolerance: one unit in the last place, the
// rounding of the written constant.
func TestDefaultFloatLimitIs24dB(t *testing.T) {
	want := math.Pow(10, DefaultFloatLimitDB/20)
	if d := math.Abs(DefaultFloatLimit - want); d > math.Nextafter(want, 100)-want {
		t.Errorf("DefaultFloatLimit = %.17g, 10^(24/20) = %.17g", DefaultFloatLimit, want)
	}
}

// The case: one absurd float sample (1e30, 3.4e38, and float64
// 1e300) stops the read at its frame with an error naming file, frame and
// channel, before any later sample is delivered; NaN and Inf likewise;
// moderate overs (+6 dBFS, and the bound itself) pass and are counted.
func TestFloatInputLevels(t *testing.T) {
	stereo32 := func(d []byte) []byte { return riffWave(chunk("fmt ", fmtStd(3, 2, 48000, 32)), chunk("data", d)) }
	mono64 := func(d []byte) []byte { return riffWave(chunk("fmt ", fmtStd(3, 1, 48000, 64)), chunk("data", d)) }
	tests := []struct {
		name      string
		file      []byte
		kind      error // nil: reads to the end
		frame     int64
		channel   int
		delivered int // samples before the fault, or all of them
		overs     int64
	}{
		{"float32 1e30 at frame 2 channel 1", stereo32(f32(0.1, -0.1, 0.2, 0.2, 0.5, 1e30, 0, 0)), ErrOverLimit, 2, 1, 4, 0},
		{"float32 3.4e38 at frame 0", stereo32(f32(3.4e38, 0)), ErrOverLimit, 0, 0, 0, 0},
		{"float64 1e300 at frame 1", mono64(f64(0.5, 1e300, 0)), ErrOverLimit, 1, 0, 1, 0},
		{"float64 just above the bound", mono64(f64(math.Nextafter(DefaultFloatLimit, 100))), ErrOverLimit, 0, 0, 0, 0},
		{"float32 NaN", stereo32(f32(0, float32(math.NaN()))), ErrNonFinite, 0, 1, 0, 0},
		{"float64 -Inf", mono64(f64(0, 0, math.Inf(-1))), ErrNonFinite, 2, 0, 2, 0},
		{"moderate overs pass and are counted", stereo32(f32(2, -2, 1, -1, 0.5, 15)), nil, 0, 0, 6, 3},
		{"the bound itself passes", mono64(f64(DefaultFloatLimit, -DefaultFloatLimit)), nil, 0, 0, 2, 2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "take.wav")
			if err := os.WriteFile(path, tc.file, 0o644); err != nil {
				t.Fatal(err)
			}
			r, err := Open(path)
			if err != nil {
				t.Fatal(err)
			}
			defer r.Close()
			var got []float64
			buf := make([]float64, 64)
			for {
				n, err := r.Read(buf)
				got = append(got, buf[:n]...)
				if err == io.EOF {
					if tc.kind != nil {
						t.Fatalf("read to the end, want %v", tc.kind)
					}
					break
				}
				if err != nil {
					var se *SampleError
					if tc.kind == nil || !errors.Is(err, tc.kind) || !errors.As(err, &se) {
						t.Fatalf("err = %v, want %v", err, tc.kind)
					}
					if se.Frame != tc.frame || se.Channel != tc.channel || se.Path != path {
						t.Errorf("frame %d channel %d path %q; want %d %d %q", se.Frame, se.Channel, se.Path, tc.frame, tc.channel, path)
					}
					msg := err.Error()
					if strings.ContainsAny(msg, "\r\n") || !strings.Contains(msg, path) {
						t.Errorf("message %q: want one line naming the file", msg)
					}
					// The value as written: shortest binary32 form for
					// data read from 32-bit floats (1e+30), binary64 else.
					shown := strconv.FormatFloat(se.Value, 'g', -1, 64)
					if float64(float32(se.Value)) == se.Value {
						shown = strconv.FormatFloat(se.Value, 'g', -1, 32)
					}
					if tc.kind == ErrOverLimit && (strings.Contains(msg, "non-finite") || !strings.Contains(msg, "+24.0 dBFS") ||
						!strings.Contains(msg, "("+shown+")")) {
						t.Errorf("message %q: want the bound named, not \"non-finite\"", msg)
					}
					break
				}
			}
			if len(got) != tc.delivered {
				t.Errorf("delivered %d samples, want %d", len(got), tc.delivered)
			}
			if r.Overs() != tc.overs {
				t.Errorf("Overs = %d, want %d", r.Overs(), tc.overs)
			}
		})
	}
}

// SetFloatLimit moves the bound; +Inf accepts any finite value; a bound
// that is not above zero is refused.
func TestSetFloatLimit(t *testing.T) {
	file := riffWave(chunk("fmt ", fmtStd(3, 1, 48000, 32)), chunk("data", f32(1e30, 3, float32(math.Inf(1)))))
	r, err := NewReader(bytes.NewReader(file))
	if err != nil {
		t.Fatal(err)
	}
	if err := r.SetFloatLimit(math.Inf(1)); err != nil {
		t.Fatal(err)
	}
	buf := make([]float64, 4)
	n, err := r.Read(buf)
	if n != 2 || buf[0] != float64(float32(1e30)) || !errors.Is(err, ErrNonFinite) {
		t.Errorf("with no bound: %d samples %v, err %v; want 1e30, 3 then ErrNonFinite", n, buf[:n], err)
	}
	for _, bad := range []float64{0, -1, math.NaN()} {
		if err := r.SetFloatLimit(bad); err == nil {
			t.Errorf("SetFloatLimit(%g) accepted", bad)
		}
	}
	r2, _ := NewReader(bytes.NewReader(file))
	r2.SetFloatLimit(2)
	if n, err := r2.Read(buf); n != 0 || !errors.Is(err, ErrOverLimit) {
		t.Errorf("bound 2: %d, %v; want ErrOverLimit at once", n, err)
	}
}

// Misleading messages (issue item 8): a 4 GHz rate is reported as the
// rate the file declares, not clamped to 2147483647.
func TestRateMessage(t *testing.T) {
	file := riffWave(chunk("fmt ", fmtBody(1, 1, 4000000000, 0, 2, 16)), chunk("data", make([]byte, 4)))
	_, err := NewReader(bytes.NewReader(file))
	if !errors.Is(err, ErrUnsupported) || !strings.Contains(err.Error(), "4000000000 Hz") || strings.Contains(err.Error(), "2147483647") {
		t.Errorf("err = %v, want the declared 4000000000 Hz", err)
	}
}

// A writer that left out the pad byte after an odd-sized chunk (RIFF
// 1991: chunks are padded to even length) put the next header one byte
// early. The reader takes it there, says so in Warnings, and decodes the
// samples exactly; bytes that are no chunk id at all are reported as
// damage after the last good chunk, not as a strange chunk name.
func TestMissingPadByte(t *testing.T) {
	list := chunkSized("LIST", 5, []byte("INFOx")) // odd, no pad byte
	file := riffWave(chunk("fmt ", fmtStd(1, 1, 44100, 16)), list, chunk("data", cat(le16(0x4000), le16(0xC000))))
	r, err := NewReader(bytes.NewReader(file))
	if err != nil {
		t.Fatalf("missing pad byte: %v", err)
	}
	got, err := readAll(t, r, 8)
	if err != nil || len(got) != 2 || got[0] != 0.5 || got[1] != -0.5 {
		t.Errorf("samples %v, %v; want [0.5 -0.5]", got, err)
	}
	if w := r.Warnings(); len(w) != 1 || !strings.Contains(w[0], "pad byte") || !strings.Contains(w[0], "LIST") {
		t.Errorf("Warnings = %q, want one naming the LIST chunk's pad byte", w)
	}

	damaged := riffWave(chunk("fmt ", fmtStd(1, 1, 44100, 16)), []byte{0xFF, 0x01, 0x00, 0x9C, 4, 0, 0, 0}, chunk("data", make([]byte, 4)))
	_, err = NewReader(bytes.NewReader(damaged))
	var fe *FormatError
	if !errors.Is(err, ErrBadFormat) || !errors.As(err, &fe) || fe.Offset != 36 || !strings.Contains(err.Error(), `"fmt "`) {
		t.Errorf("damaged stream: %v; want ErrBadFormat at offset 36 naming the fmt chunk before it", err)
	}
}
