package wavio

import (
	"bytes"
	"encoding/binary"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/go-audio/wav"
)

func writeAll(t testing.TB, f Format, src []float64) ([]byte, *Writer) {
	t.Helper()
	var m memWS
	w, err := NewWriter(&m, f)
	if err != nil {
		t.Fatal(err)
	}
	// Several calls of uneven size, to cross block boundaries.
	ch := f.Channels
	for len(src) > 0 {
		k := min(len(src), ch*(1+len(src)/ch/3))
		if err := w.Write(src[:k]); err != nil {
			t.Fatal(err)
		}
		src = src[k:]
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return m.b, w
}

// TestRoundTrip writes seeded uniform noise in every output format and reads
// it back. Checks and tolerances:
//   - PCM: |read - written| <= 2^-bits, half an LSB, the bound of rounding
//     to nearest (any quantiser handbook; common practice). Noise is scaled
//     by 0.999 so no sample reaches the clamp.
//   - PCM again: writing the decoded values reproduces the file byte for
//     byte (decoded values are exact codes, so quantisation is idempotent).
//   - float32: read == float64(float32(x)), exact (IEEE 754 conversion).
//   - float64: read == x, exact.
//   - header: tag 0xFFFE exactly when channels > 2 or PCM deeper than 16
//     bits (Microsoft, "Multiple Channel Audio Data and WAVE Files"), RIFF
//     size = file length - 8, total length even (RIFF 1991 padding rule).
func TestRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	var formats []Format
	for _, enc := range []struct {
		bits  int
		float bool
	}{{16, false}, {24, false}, {32, false}, {32, true}, {64, true}} {
		for _, ch := range []int{1, 2, 3, 8} {
			for _, rate := range []int{44100, 48000, 96000, 192000} {
				formats = append(formats, Format{SampleRate: rate, Channels: ch, BitDepth: enc.bits, Float: enc.float})
			}
		}
	}
	worst := map[int]float64{} // largest PCM error per bit depth, in LSBs
	defer func() { t.Logf("largest PCM round-trip error, LSB: %v (bound 0.5)", worst) }()
	for _, f := range formats {
		frames := 1 + rng.IntN(6000) // odd and even counts, exercising the pad byte
		src := make([]float64, frames*f.Channels)
		for i := range src {
			src[i] = 0.999 * (2*rng.Float64() - 1)
		}
		file, w := writeAll(t, f, src)
		if w.Clipped() != 0 || w.Frames() != int64(frames) {
			t.Fatalf("%v: Clipped %d Frames %d, want 0 and %d", f, w.Clipped(), w.Frames(), frames)
		}
		r, err := NewReader(bytes.NewReader(file))
		if err != nil {
			t.Fatalf("%v: %v", f, err)
		}
		if r.Format() != f || r.Frames() != int64(frames) {
			t.Fatalf("read back %v with %d frames, want %v with %d", r.Format(), r.Frames(), f, frames)
		}
		got, err := readAll(t, r, 777*f.Channels)
		if err != nil || len(got) != len(src) {
			t.Fatalf("%v: %d samples, %v", f, len(got), err)
		}
		var maxErr float64
		for i, x := range src {
			switch {
			case !f.Float:
				maxErr = max(maxErr, math.Abs(got[i]-x))
			case f.BitDepth == 32:
				if got[i] != float64(float32(x)) {
					t.Fatalf("%v: sample %d = %v, want float32(%v)", f, i, got[i], x)
				}
			default:
				if got[i] != x {
					t.Fatalf("%v: sample %d = %v, want %v", f, i, got[i], x)
				}
			}
		}
		if !f.Float {
			worst[f.BitDepth] = max(worst[f.BitDepth], maxErr*math.Ldexp(1, f.BitDepth-1))
		}
		if tol := math.Ldexp(1, -f.BitDepth); !f.Float && maxErr > tol {
			t.Errorf("%v: max error %.3g exceeds half an LSB %.3g", f, maxErr, tol)
		}
		if !f.Float {
			again, _ := writeAll(t, f, got)
			if !bytes.Equal(again, file) {
				t.Errorf("%v: rewriting decoded samples changed the file", f)
			}
		}
		tag := binary.LittleEndian.Uint16(file[20:])
		wantTag := uint16(1)
		if f.Float {
			wantTag = 3
		}
		if f.Channels > 2 || (!f.Float && f.BitDepth > 16) {
			wantTag = 0xFFFE
		}
		if tag != wantTag {
			t.Errorf("%v: format tag 0x%04X, want 0x%04X", f, tag, wantTag)
		}
		if size := binary.LittleEndian.Uint32(file[4:]); int(size) != len(file)-8 || len(file)%2 != 0 {
			t.Errorf("%v: RIFF size %d for %d-byte file", f, size, len(file))
		}
	}
}

// TestWriterDecodedByReference writes PCM with this package and decodes it
// with go-audio/wav v1.1.0 (reference library): the reference's integer
// codes times 2^-(bits-1) must equal this package's decoded samples exactly,
// and the reference must see the same rate, channels and bit depth. Frame
// counts are even because the reference reads a data chunk's pad byte as
// sample data.
func TestWriterDecodedByReference(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	dir := t.TempDir()
	for _, f := range []Format{
		{SampleRate: 44100, Channels: 1, BitDepth: 16},
		{SampleRate: 48000, Channels: 2, BitDepth: 16},
		{SampleRate: 96000, Channels: 2, BitDepth: 24},
		{SampleRate: 192000, Channels: 1, BitDepth: 24},
		{SampleRate: 48000, Channels: 2, BitDepth: 32},
		{SampleRate: 44100, Channels: 4, BitDepth: 16},
	} {
		src := make([]float64, 2000*f.Channels)
		for i := range src {
			src[i] = 1.2 * (2*rng.Float64() - 1) // some clipping too
		}
		file, w := writeAll(t, f, src)
		if w.Clipped() == 0 {
			t.Errorf("%v: no clipping counted for noise peaking at 1.2", f)
		}
		name := filepath.Join(dir, "out.wav")
		if err := os.WriteFile(name, file, 0o644); err != nil {
			t.Fatal(err)
		}
		rf, err := os.Open(name)
		if err != nil {
			t.Fatal(err)
		}
		dec := wav.NewDecoder(rf)
		ref, err := dec.FullPCMBuffer()
		rf.Close()
		if err != nil {
			t.Fatalf("%v: reference decoder: %v", f, err)
		}
		if int(dec.SampleRate) != f.SampleRate || int(dec.NumChans) != f.Channels || int(dec.BitDepth) != f.BitDepth {
			t.Errorf("%v: reference sees %d Hz %d ch %d bits", f, dec.SampleRate, dec.NumChans, dec.BitDepth)
		}
		r, _ := NewReader(bytes.NewReader(file))
		got, _ := readAll(t, r, 4096)
		if len(ref.Data) != len(got) {
			t.Fatalf("%v: reference decoded %d samples, want %d", f, len(ref.Data), len(got))
		}
		scale := math.Ldexp(1, -(f.BitDepth - 1))
		for i := range got {
			if want := float64(ref.Data[i]) * scale; got[i] != want {
				t.Fatalf("%v: sample %d = %v, reference %v", f, i, got[i], want)
			}
		}
	}
}

// TestQuantize checks rounding and clamping code by code, decoding the data
// bytes directly as two's complement little-endian. Expected codes follow
// from round-half-away-from-zero (IEEE 754-2008 roundTiesToAway, which
// math.Round implements) and the two's complement range [-2^(b-1),
// 2^(b-1)-1]. Exact: no tolerance.
func TestQuantize(t *testing.T) {
	for _, bits := range []int{16, 24, 32} {
		lsb := math.Ldexp(1, -(bits - 1))
		top := int64(1)<<(bits-1) - 1
		tests := []struct {
			x       float64
			code    int64
			clipped bool
		}{
			{0, 0, false},
			{0.5 * lsb, 1, false},   // tie rounds away from zero
			{-0.5 * lsb, -1, false}, // tie rounds away from zero
			{0.49 * lsb, 0, false},
			{1.5 * lsb, 2, false},
			{-2.5 * lsb, -3, false},
			{0.5, top/2 + 1, false},
			{-1, -top - 1, false}, // negative full scale is representable
			{1 - lsb, top, false},
			{1 - 0.5*lsb, top, true}, // rounds to 2^(b-1): clamped
			{1, top, true},
			{1.5, top, true},
			{-1.5, -top - 1, true},
			{math.MaxFloat64, top, true},
		}
		for _, tc := range tests {
			f := Format{SampleRate: 48000, Channels: 1, BitDepth: bits}
			file, w := writeAll(t, f, []float64{tc.x})
			hdr := 12 + 8 + 16 + 8 // RIFF, plain fmt, data header
			if bits > 16 {
				hdr = 12 + 8 + 40 + 12 + 8 // RIFF, extensible fmt, fact, data header
			}
			var code int64
			switch bits {
			case 16:
				code = int64(int16(binary.LittleEndian.Uint16(file[hdr:])))
			case 24:
				u := uint32(file[hdr]) | uint32(file[hdr+1])<<8 | uint32(file[hdr+2])<<16
				code = int64(int32(u<<8) >> 8)
			case 32:
				code = int64(int32(binary.LittleEndian.Uint32(file[hdr:])))
			}
			if code != tc.code || (w.Clipped() == 1) != tc.clipped {
				t.Errorf("%d-bit x=%v: code %d clipped %d, want %d clipped %v", bits, tc.x, code, w.Clipped(), tc.code, tc.clipped)
			}
		}
	}
}

func TestWriterRefusesNonFinite(t *testing.T) {
	tests := []struct {
		f       Format
		src     []float64
		frame   int64
		channel int
		kind    error
	}{
		{Format{SampleRate: 48000, Channels: 2, BitDepth: 32, Float: true}, []float64{0, 0, 0.1, 0.2, 0.3, math.NaN()}, 2, 1, ErrNonFinite},
		{Format{SampleRate: 48000, Channels: 1, BitDepth: 64, Float: true}, []float64{math.Inf(1)}, 0, 0, ErrNonFinite},
		{Format{SampleRate: 48000, Channels: 2, BitDepth: 16}, []float64{0, math.Inf(-1)}, 0, 1, ErrNonFinite},
		{Format{SampleRate: 48000, Channels: 1, BitDepth: 24}, []float64{0.5, math.NaN()}, 1, 0, ErrNonFinite},
		// Finite in float64 but +Inf once rounded to binary32 (largest
		// finite binary32 3.4028235e38, IEEE 754-2008): out of the
		// format's range, and said so, not "non-finite" (issue item 8).
		{Format{SampleRate: 48000, Channels: 1, BitDepth: 32, Float: true}, []float64{0, 1e39}, 1, 0, ErrRange},
		{Format{SampleRate: 48000, Channels: 1, BitDepth: 32, Float: true}, []float64{1e300}, 0, 0, ErrRange},
	}
	for _, tc := range tests {
		var m memWS
		w, err := NewWriter(&m, tc.f)
		if err != nil {
			t.Fatal(err)
		}
		if err := w.Write(nil); err != nil { // an empty write is fine
			t.Fatal(err)
		}
		prefix := make([]float64, tc.f.Channels)
		if err := w.Write(prefix); err != nil {
			t.Fatal(err)
		}
		before := len(m.b)
		err = w.Write(tc.src)
		var se *SampleError
		if !errors.Is(err, tc.kind) || !errors.As(err, &se) {
			t.Fatalf("%v: Write = %v, want *SampleError wrapping %v", tc.f, err, tc.kind)
		}
		if tc.kind == ErrRange && strings.Contains(err.Error(), "non-finite") {
			t.Errorf("%v: finite value reported as %q", tc.f, err)
		}
		if se.Frame != 1+tc.frame || se.Channel != tc.channel {
			t.Errorf("%v: frame %d channel %d, want %d %d", tc.f, se.Frame, se.Channel, 1+tc.frame, tc.channel)
		}
		if len(m.b) != before {
			t.Errorf("%v: refused Write still wrote %d bytes", tc.f, len(m.b)-before)
		}
		if strings.ContainsAny(err.Error(), "\r\n") {
			t.Errorf("multi-line message %q", err)
		}
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		r, err := NewReader(bytes.NewReader(m.b))
		if err != nil || r.Frames() != 1 {
			t.Errorf("%v: file after refused write: %v, %d frames, want 1", tc.f, err, r.Frames())
		}
	}
	// The largest binary32 value itself is accepted.
	var m memWS
	w, _ := NewWriter(&m, Format{SampleRate: 48000, Channels: 1, BitDepth: 32, Float: true})
	if err := w.Write([]float64{math.MaxFloat32, -math.MaxFloat32}); err != nil {
		t.Errorf("MaxFloat32 refused: %v", err)
	}
}

func TestWriterErrors(t *testing.T) {
	formats := []struct {
		f    Format
		kind error
	}{
		{Format{SampleRate: 48000, Channels: 1, BitDepth: 8}, ErrUnsupported},
		{Format{SampleRate: 48000, Channels: 1, BitDepth: 12}, ErrUnsupported},
		{Format{SampleRate: 48000, Channels: 1, BitDepth: 16, Float: true}, ErrUnsupported},
		{Format{SampleRate: 48000, Channels: 0, BitDepth: 16}, ErrBadFormat},
		{Format{SampleRate: 48000, Channels: 9, BitDepth: 16}, ErrUnsupported},
		{Format{SampleRate: 0, Channels: 2, BitDepth: 16}, ErrBadFormat},
		{Format{SampleRate: 4000, Channels: 2, BitDepth: 16}, ErrUnsupported},
		{Format{SampleRate: 400000, Channels: 2, BitDepth: 16}, ErrUnsupported},
	}
	for _, tc := range formats {
		var m memWS
		if _, err := NewWriter(&m, tc.f); !errors.Is(err, tc.kind) {
			t.Errorf("NewWriter(%+v) = %v, want %v", tc.f, err, tc.kind)
		}
	}

	var m memWS
	w, _ := NewWriter(&m, Format{SampleRate: 48000, Channels: 2, BitDepth: 16})
	if err := w.Write([]float64{0, 0, 0}); !errors.Is(err, ErrPartialFrame) {
		t.Errorf("Write of 3 samples to stereo = %v, want ErrPartialFrame", err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Errorf("second Close = %v, want nil", err)
	}
	if err := w.Write([]float64{0, 0}); !errors.Is(err, ErrClosed) {
		t.Errorf("Write after Close = %v, want ErrClosed", err)
	}

	// An I/O failure is returned, wrapped, and stays.
	fw := &failWS{okWrites: 1} // header succeeds, data fails
	w, err := NewWriter(fw, Format{SampleRate: 48000, Channels: 1, BitDepth: 16})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Write([]float64{0.1}); !errors.Is(err, errDiskFull) {
		t.Errorf("Write on failing writer = %v, want errDiskFull", err)
	}
	if err := w.Close(); !errors.Is(err, errDiskFull) {
		t.Errorf("Close after failed Write = %v, want errDiskFull", err)
	}
}

// TestWriterLayout pins the header bytes against the field layouts of the
// specifications (see helpers_test.go), built independently in the test.
func TestWriterLayout(t *testing.T) {
	tests := []struct {
		f      Format
		src    []float64
		header []byte // everything before the data bytes, with final sizes
		data   []byte
	}{
		{
			Format{SampleRate: 44100, Channels: 2, BitDepth: 16}, []float64{0.5, -0.5},
			cat([]byte("RIFF"), le32(36+4), []byte("WAVE"), chunk("fmt ", fmtStd(1, 2, 44100, 16)), []byte("data"), le32(4)),
			cat(le16(0x4000), le16(0xC000)),
		},
		{
			Format{SampleRate: 48000, Channels: 1, BitDepth: 32, Float: true}, []float64{0.5},
			cat([]byte("RIFF"), le32(4+26+12+8+4), []byte("WAVE"), chunk("fmt ", cat(fmtStd(3, 1, 48000, 32), le16(0))),
				chunk("fact", le32(1)), []byte("data"), le32(4)),
			le32(0x3F000000),
		},
		{
			// 24-bit mono, 1 frame: 3 data bytes then a pad byte.
			Format{SampleRate: 96000, Channels: 1, BitDepth: 24}, []float64{-1},
			cat([]byte("RIFF"), le32(4+48+12+8+4), []byte("WAVE"), chunk("fmt ", fmtExt(1, 96000, 24, 24, 0x4, guidPCM)),
				chunk("fact", le32(1)), []byte("data"), le32(3)),
			[]byte{0x00, 0x00, 0x80, 0x00},
		},
		{
			Format{SampleRate: 48000, Channels: 3, BitDepth: 64, Float: true}, []float64{1, 0, -1},
			cat([]byte("RIFF"), le32(4+48+12+8+24), []byte("WAVE"), chunk("fmt ", fmtExt(3, 48000, 64, 64, 0, guidFloat)),
				chunk("fact", le32(1)), []byte("data"), le32(24)),
			cat(le64(0x3FF0000000000000), le64(0), le64(0xBFF0000000000000)),
		},
	}
	for _, tc := range tests {
		file, _ := writeAll(t, tc.f, tc.src)
		if want := cat(tc.header, tc.data); !bytes.Equal(file, want) {
			t.Errorf("%v:\n got % X\nwant % X", tc.f, file, want)
		}
	}
}

// TestWriterNonZeroStart writes after a prefix; sizes are patched relative
// to where the header began and the writer ends at the end of the stream.
func TestWriterNonZeroStart(t *testing.T) {
	var m memWS
	m.Write([]byte("prefix"))
	w, err := NewWriter(&m, Format{SampleRate: 48000, Channels: 1, BitDepth: 16})
	if err != nil {
		t.Fatal(err)
	}
	w.Write([]float64{0.25, 0.5})
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if pos, _ := m.Seek(0, io.SeekCurrent); pos != int64(len(m.b)) {
		t.Errorf("position after Close %d, want end %d", pos, len(m.b))
	}
	rs := bytes.NewReader(m.b)
	rs.Seek(6, io.SeekStart)
	r, err := NewReader(rs)
	if err != nil {
		t.Fatal(err)
	}
	got, err := readAll(t, r, 8)
	if err != nil || len(got) != 2 || got[0] != 0.25 || got[1] != 0.5 {
		t.Errorf("got %v, %v", got, err)
	}
}

func TestWriteAllocs(t *testing.T) {
	m := memWS{b: make([]byte, 0, 1<<22)}
	for _, f := range []Format{
		{SampleRate: 48000, Channels: 2, BitDepth: 24},
		{SampleRate: 48000, Channels: 2, BitDepth: 32, Float: true},
	} {
		m.b, m.off = m.b[:0], 0
		w, err := NewWriter(&m, f)
		if err != nil {
			t.Fatal(err)
		}
		src := make([]float64, 256)
		for i := range src {
			src[i] = math.Sin(float64(i))
		}
		if a := testing.AllocsPerRun(1000, func() { w.Write(src) }); a != 0 {
			t.Errorf("%v: Write allocates %v times per call, want 0", f, a)
		}
	}
}

func BenchmarkWrite(b *testing.B) {
	for _, f := range []Format{
		{SampleRate: 48000, Channels: 2, BitDepth: 24},
		{SampleRate: 48000, Channels: 2, BitDepth: 32, Float: true},
	} {
		b.Run(f.String(), func(b *testing.B) {
			m := memWS{b: make([]byte, 0, 1<<24)}
			src := make([]float64, 4096)
			for i := range src {
				src[i] = math.Sin(float64(i))
			}
			b.SetBytes(int64(len(src) * f.BitDepth / 8))
			b.ReportAllocs()
			w, _ := NewWriter(&m, f)
			for b.Loop() {
				if w.Frames() > 1<<20 {
					m.b, m.off = m.b[:0], 0
					w, _ = NewWriter(&m, f)
				}
				if err := w.Write(src); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
