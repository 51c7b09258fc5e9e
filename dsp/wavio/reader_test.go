package wavio

import (
	"bytes"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/go-audio/audio"
	"github.com/go-audio/wav"
)

// readAll drains r with a dst of chunk samples per call, checking that every
// call returns whole frames.
func readAll(t testing.TB, r *Reader, chunk int) ([]float64, error) {
	t.Helper()
	dst := make([]float64, chunk)
	var out []float64
	for {
		n, err := r.Read(dst)
		if n%r.Format().Channels != 0 {
			t.Fatalf("Read returned %d samples, not a multiple of %d channels", n, r.Format().Channels)
		}
		out = append(out, dst[:n]...)
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return out, err
		}
		if n == 0 {
			t.Fatal("Read returned 0, nil")
		}
	}
}

// TestDecodeExact decodes hand-built files and expects the exact values that
// the specifications assign to the stored codes: PCM code k of b bits is
// k/2^(b-1) (8-bit: (k-128)/128), per the 1991 RIFF/WAVE specification's
// sample layout and the usual full-scale convention (common practice); float
// bit patterns are the IEEE 754-2008 binary32/binary64 values written out in
// decimal. Tolerance: none (every value is a dyadic rational exactly
// representable in float64, so equality is required).
func TestDecodeExact(t *testing.T) {
	list := chunk("LIST", cat([]byte("INFO"), chunk("ISFT", []byte("test\x00"))))
	junkOdd := chunk("JUNK", []byte{1, 2, 3}) // size 3, one pad byte follows
	tests := []struct {
		name string
		file []byte
		want Format
		data []float64
	}{
		{
			name: "pcm8 mono unsigned offset",
			file: riffWave(chunk("fmt ", fmtStd(1, 1, 8000, 8)), chunk("data", []byte{0x00, 0x80, 0xFF, 0x01})),
			want: Format{SampleRate: 8000, Channels: 1, BitDepth: 8},
			data: []float64{-1, 0, 0.9921875, -0.9921875}, // (0-128)/128, 0, 127/128, -127/128
		},
		{
			name: "pcm8 odd length data with pad and trailing chunk",
			file: riffWave(chunk("fmt ", fmtStd(1, 1, 11025, 8)), chunk("data", []byte{0x40, 0xC0, 0x80}), list),
			want: Format{SampleRate: 11025, Channels: 1, BitDepth: 8},
			data: []float64{-0.5, 0.5, 0},
		},
		{
			name: "pcm16 stereo with LIST before fmt, odd JUNK and chunk after data",
			file: riffWave(list, chunk("fmt ", fmtStd(1, 2, 44100, 16)), junkOdd,
				chunk("data", cat(le16(0x8000), le16(0x7FFF), le16(0x0001), le16(0xFFFF))), list),
			want: Format{SampleRate: 44100, Channels: 2, BitDepth: 16},
			data: []float64{-1, 0.999969482421875, 1.0 / 32768, -1.0 / 32768}, // 32767/32768
		},
		{
			name: "pcm16 data chunk before fmt chunk",
			file: riffWave(chunk("data", cat(le16(0x4000), le16(0xC000))), chunk("fmt ", fmtStd(1, 1, 22050, 16))),
			want: Format{SampleRate: 22050, Channels: 1, BitDepth: 16},
			data: []float64{0.5, -0.5},
		},
		{
			name: "pcm24 mono plain tag",
			file: riffWave(chunk("fmt ", fmtStd(1, 1, 96000, 24)),
				chunk("data", []byte{0x00, 0x00, 0x80, 0xFF, 0xFF, 0x7F, 0x00, 0x00, 0x40, 0x01, 0x00, 0x00, 0xFF, 0xFF, 0xFF})), // 15 bytes, padded by chunk()
			want: Format{SampleRate: 96000, Channels: 1, BitDepth: 24},
			// -1, 8388607/8388608, 0.5, 2^-23, -2^-23
			data: []float64{-1, 0.99999988079071044921875, 0.5, 1.1920928955078125e-07, -1.1920928955078125e-07},
		},
		{
			name: "pcm32 stereo plain tag",
			file: riffWave(chunk("fmt ", fmtStd(1, 2, 192000, 32)),
				chunk("data", cat(le32(0x80000000), le32(0x7FFFFFFF), le32(0x40000000), le32(0x00000001)))),
			want: Format{SampleRate: 192000, Channels: 2, BitDepth: 32},
			// -1, 2147483647/2147483648, 0.5, 2^-31
			data: []float64{-1, 0.99999999953433871269226074218750, 0.5, 4.656612873077392578125e-10},
		},
		{
			name: "float32 tag 3 with cbSize 0 and fact chunk",
			file: riffWave(chunk("fmt ", cat(fmtStd(3, 1, 48000, 32), le16(0))), chunk("fact", le32(6)),
				chunk("data", cat(le32(0x3F000000), le32(0xBE800000), le32(0x3F800000), le32(0x3DCCCCCD), le32(0x00000001), le32(0xC0000000)))),
			want: Format{SampleRate: 48000, Channels: 1, BitDepth: 32, Float: true},
			// 0.5, -0.25, 1, nearest binary32 to 0.1, 2^-149 (smallest subnormal), -2 (float is not clamped)
			data: []float64{0.5, -0.25, 1, 0.100000001490116119384765625, 1.40129846432481707092372958328991613128026194187651577175706828388979108268586060148663818836212158203125e-45, -2},
		},
		{
			name: "float32 tag 3 with 16-byte fmt",
			file: riffWave(chunk("fmt ", fmtStd(3, 2, 384000, 32)), chunk("data", cat(le32(0xBF800000), le32(0x3E800000)))),
			want: Format{SampleRate: 384000, Channels: 2, BitDepth: 32, Float: true},
			data: []float64{-1, 0.25},
		},
		{
			name: "float64 tag 3 stereo",
			file: riffWave(chunk("fmt ", cat(fmtStd(3, 2, 88200, 64), le16(0))), chunk("fact", le32(2)),
				chunk("data", cat(le64(0x3FE0000000000000), le64(0xBFF0000000000000), le64(0x3FB999999999999A), le64(0x0000000000000001)))),
			want: Format{SampleRate: 88200, Channels: 2, BitDepth: 64, Float: true},
			// 0.5, -1, nearest binary64 to 0.1, 2^-1074
			data: []float64{0.5, -1, 0.1000000000000000055511151231257827021181583404541015625, 4.9406564584124654e-324},
		},
		{
			name: "extensible pcm24 stereo",
			file: riffWave(chunk("fmt ", fmtExt(2, 48000, 24, 24, 0x3, guidPCM)), chunk("fact", le32(2)),
				chunk("data", []byte{0x00, 0x00, 0xC0, 0x00, 0x00, 0x20, 0xFF, 0xFF, 0x7F, 0x00, 0x00, 0x80})),
			want: Format{SampleRate: 48000, Channels: 2, BitDepth: 24},
			data: []float64{-0.5, 0.25, 0.99999988079071044921875, -1},
		},
		{
			name: "extensible pcm32 container with 24 valid bits, left-justified",
			file: riffWave(chunk("fmt ", fmtExt(1, 44100, 32, 24, 0x4, guidPCM)),
				chunk("data", cat(le32(0x7FFFFF00), le32(0xFFFFFF00)))),
			want: Format{SampleRate: 44100, Channels: 1, BitDepth: 32},
			data: []float64{0.99999988079071044921875, -1.1920928955078125e-07}, // 8388607/2^23, -2^-23
		},
		{
			name: "extensible pcm16 four channels, mask 0x33",
			file: riffWave(chunk("fmt ", fmtExt(4, 32000, 16, 16, 0x33, guidPCM)),
				chunk("data", cat(le16(0x2000), le16(0xE000), le16(0x1000), le16(0xF000)))),
			want: Format{SampleRate: 32000, Channels: 4, BitDepth: 16},
			data: []float64{0.25, -0.25, 0.125, -0.125},
		},
		{
			name: "extensible float32 three channels",
			file: riffWave(chunk("fmt ", fmtExt(3, 96000, 32, 32, 0, guidFloat)), chunk("fact", le32(1)),
				chunk("data", cat(le32(0x3F400000), le32(0xBF400000), le32(0x00000000)))),
			want: Format{SampleRate: 96000, Channels: 3, BitDepth: 32, Float: true},
			data: []float64{0.75, -0.75, 0},
		},
		{
			name: "extensible float64 mono, valid bits 0 (unspecified)",
			file: riffWave(chunk("fmt ", fmtExt(1, 176400, 64, 0, 0x4, guidFloat)), chunk("fact", le32(1)),
				chunk("data", le64(0xC00C000000000000))),
			want: Format{SampleRate: 176400, Channels: 1, BitDepth: 64, Float: true},
			data: []float64{-3.5},
		},
		{
			name: "eight channels pcm16 extensible",
			file: riffWave(chunk("fmt ", fmtExt(8, 48000, 16, 16, 0x63F, guidPCM)),
				chunk("data", cat(le16(1), le16(2), le16(3), le16(4), le16(0xFFFC), le16(0xFFFD), le16(0xFFFE), le16(0xFFFF)))),
			want: Format{SampleRate: 48000, Channels: 8, BitDepth: 16},
			data: []float64{1.0 / 32768, 2.0 / 32768, 3.0 / 32768, 4.0 / 32768, -4.0 / 32768, -3.0 / 32768, -2.0 / 32768, -1.0 / 32768},
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for _, chunkLen := range []int{tc.want.Channels, 3 * tc.want.Channels, 4096} {
				r, err := NewReader(bytes.NewReader(tc.file))
				if err != nil {
					t.Fatal(err)
				}
				if r.Format() != tc.want {
					t.Fatalf("Format = %+v, want %+v", r.Format(), tc.want)
				}
				if want := int64(len(tc.data) / tc.want.Channels); r.Frames() != want {
					t.Fatalf("Frames = %d, want %d", r.Frames(), want)
				}
				got, err := readAll(t, r, chunkLen)
				if err != nil {
					t.Fatal(err)
				}
				if len(got) != len(tc.data) {
					t.Fatalf("dst %d: got %d samples, want %d", chunkLen, len(got), len(tc.data))
				}
				for i := range got {
					if got[i] != tc.data[i] {
						t.Errorf("dst %d: sample %d = %.17g, want %.17g (exact)", chunkLen, i, got[i], tc.data[i])
					}
				}
				if n, err := r.Read(make([]float64, 8)); n != 0 || err != io.EOF {
					t.Errorf("Read after end = %d, %v; want 0, EOF", n, err)
				}
			}
		})
	}
}

// TestReadMatchesReference writes integer PCM files with go-audio/wav's
// encoder and checks that every decoded sample equals go-audio/wav's own
// decoder output scaled by 2^-(bits-1) (8-bit: the reference returns the
// unsigned code, so (code-128)/128). Reference library: github.com/go-audio/wav
// v1.1.0. Tolerance: none, the scaled codes are exact in float64.
func TestReadMatchesReference(t *testing.T) {
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(1, 2))
	for _, bits := range []int{8, 16, 24, 32} {
		for _, ch := range []int{1, 2} {
			for _, rate := range []int{44100, 96000} {
				name := filepath.Join(dir, "ref.wav")
				frames := 3001
				lo, hi := -(1 << (bits - 1)), 1<<(bits-1)-1
				if bits == 8 {
					lo, hi = 0, 255
				}
				codes := make([]int, frames*ch)
				codes[0], codes[1%len(codes)] = lo, hi // include both extremes
				for i := 2; i < len(codes); i++ {
					codes[i] = lo + int(rng.Int64N(int64(hi-lo)+1))
				}
				f, err := os.Create(name)
				if err != nil {
					t.Fatal(err)
				}
				enc := wav.NewEncoder(f, rate, bits, ch, 1)
				buf := &audio.IntBuffer{Data: codes, Format: &audio.Format{NumChannels: ch, SampleRate: rate}, SourceBitDepth: bits}
				if err := enc.Write(buf); err != nil {
					t.Fatal(err)
				}
				if err := enc.Close(); err != nil {
					t.Fatal(err)
				}
				f.Close()

				rf, _ := os.Open(name)
				ref, err := wav.NewDecoder(rf).FullPCMBuffer()
				rf.Close()
				if err != nil {
					t.Fatal(err)
				}

				r, err := Open(name)
				if err != nil {
					t.Fatal(err)
				}
				want := Format{SampleRate: rate, Channels: ch, BitDepth: bits}
				if r.Format() != want {
					t.Fatalf("Format = %+v, want %+v", r.Format(), want)
				}
				got, err := readAll(t, r.Reader, 1000)
				r.Close()
				if err != nil {
					t.Fatal(err)
				}
				if len(got) != len(ref.Data) {
					t.Fatalf("%d-bit %d ch: %d samples, reference %d", bits, ch, len(got), len(ref.Data))
				}
				scale := math.Ldexp(1, -(bits - 1))
				off := 0
				if bits == 8 {
					off = 128
				}
				bad := 0
				for i := range got {
					if want := float64(ref.Data[i]-off) * scale; got[i] != want {
						if bad++; bad < 5 {
							t.Errorf("%d-bit %d ch %d Hz: sample %d = %.17g, reference %.17g", bits, ch, rate, i, got[i], want)
						}
					}
				}
			}
		}
	}
}

func TestNonFiniteFloatInput(t *testing.T) {
	// Bit patterns from IEEE 754-2008: 0x7FC00000 is a binary32 quiet NaN,
	// 0xFF800000 binary32 -Inf, 0x7FF0000000000000 binary64 +Inf.
	nan32 := cat(le32(0x3F000000), le32(0x3F000000), le32(0x3F000000), le32(0x3F000000),
		le32(0x3F000000), le32(0x3F000000), le32(0x3F000000), le32(0x7FC00000), le32(0x3F000000), le32(0x3F000000))
	tests := []struct {
		name      string
		file      []byte
		wantFrame int64
		wantCh    int
		wantN     int // samples delivered before the fault
	}{
		{"float32 NaN at frame 3 channel 1", riffWave(chunk("fmt ", fmtStd(3, 2, 48000, 32)), chunk("data", nan32)), 3, 1, 6},
		{"float32 -Inf at frame 0", riffWave(chunk("fmt ", fmtStd(3, 1, 48000, 32)), chunk("data", cat(le32(0xFF800000), le32(0)))), 0, 0, 0},
		{"extensible float64 +Inf at frame 1", riffWave(chunk("fmt ", fmtExt(1, 48000, 64, 64, 4, guidFloat)),
			chunk("data", cat(le64(0), le64(0x7FF0000000000000)))), 1, 0, 1},
	}
	for _, tc := range tests {
		for _, chunkLen := range []int{2, 4096} {
			r, err := NewReader(bytes.NewReader(tc.file))
			if err != nil {
				t.Fatalf("%s: %v", tc.name, err)
			}
			if chunkLen < r.Format().Channels {
				continue
			}
			got, err := readAll(t, r, chunkLen)
			var se *SampleError
			if !errors.Is(err, ErrNonFinite) || !errors.As(err, &se) {
				t.Fatalf("%s: err = %v, want *SampleError wrapping ErrNonFinite", tc.name, err)
			}
			if se.Frame != tc.wantFrame || se.Channel != tc.wantCh || len(got) != tc.wantN {
				t.Errorf("%s (dst %d): frame %d channel %d after %d samples; want frame %d channel %d after %d",
					tc.name, chunkLen, se.Frame, se.Channel, len(got), tc.wantFrame, tc.wantCh, tc.wantN)
			}
			if strings.ContainsAny(err.Error(), "\n\r") || !strings.Contains(err.Error(), "frame ") {
				t.Errorf("message %q: want one line naming the frame", err)
			}
			if n, err2 := r.Read(make([]float64, 8)); n != 0 || !errors.Is(err2, ErrNonFinite) {
				t.Errorf("%s: error not sticky: %d, %v", tc.name, n, err2)
			}
		}
	}
}

// TestFaults feeds malformed streams and checks the sentinel, the byte
// offset and that the message is one line. Offsets follow the byte layout
// built here (RIFF header 12 bytes, chunk header 8, fmt fields at body
// offsets 0 tag, 2 channels, 4 rate, 12 block align, 14 bits, 16 cbSize, 24
// SubFormat).
func TestFaults(t *testing.T) {
	pcm16 := chunk("fmt ", fmtStd(1, 2, 44100, 16)) // body at offset 20
	data4 := chunk("data", make([]byte, 8))
	tests := []struct {
		name       string
		file       []byte
		kind       error
		offset     int64 // -2: don't check
		msgContain string
	}{
		{"empty", nil, ErrEmpty, 0, "empty"},
		{"not RIFF", []byte("OggS\x00\x02\x00\x00\x00\x00\x00\x00\x00\x00"), ErrNotWAVE, 0, "OggS"},
		{"three bytes", []byte("RIF"), ErrNotWAVE, 0, ""},
		{"RIFF header cut short", []byte("RIFF\x24\x00\x00"), ErrTruncated, 7, ""},
		{"RIFF but AVI form", cat([]byte("RIFF"), le32(4), []byte("AVI ")), ErrNotWAVE, 8, "AVI "},
		{"big-endian RIFX", cat([]byte("RIFX"), le32(4), []byte("WAVE")), ErrUnsupported, 0, "RIFX"},
		{"RF64", cat([]byte("RF64"), le32(0xFFFFFFFF), []byte("WAVE")), ErrUnsupported, 0, "RF64"},
		{"header only", riffWave(), ErrNoFmt, 12, "fmt"},
		{"fmt but no data", riffWave(pcm16), ErrNoData, 36, "data"},
		{"data but no fmt", riffWave(data4), ErrNoFmt, 28, "fmt"},
		{"fmt chunk runs past end", cat(riffWave(), chunkSized("fmt ", 16, fmtStd(1, 1, 44100, 16)[:10])), ErrTruncated, 30, "fmt"},
		{"LIST chunk runs past end", riffWave(pcm16, chunkSized("LIST", 1000, []byte("INFO"))), ErrTruncated, 48, "LIST"},
		{"data larger than stream", riffWave(pcm16, chunkSized("data", 4000, make([]byte, 400))), ErrTruncated, 444, "4000"},
		{"A-law", riffWave(chunk("fmt ", fmtStd(6, 1, 8000, 8)), data4), ErrUnsupported, 20, "A-law"},
		{"mu-law", riffWave(chunk("fmt ", fmtStd(7, 1, 8000, 8)), data4), ErrUnsupported, 20, "mu-law"},
		{"MS ADPCM", riffWave(chunk("fmt ", fmtStd(2, 1, 8000, 4)), data4), ErrUnsupported, 20, "ADPCM"},
		{"12-bit PCM", riffWave(chunk("fmt ", fmtBody(1, 1, 8000, 16000, 2, 12)), data4), ErrUnsupported, 34, "12-bit"},
		{"16-bit float", riffWave(chunk("fmt ", fmtStd(3, 1, 48000, 16)), data4), ErrUnsupported, 34, "16-bit"},
		{"extensible unknown GUID", riffWave(chunk("fmt ", fmtExt(2, 48000, 16, 16, 3, cat(le32(0x6D2A7B2C), guidPCM[4:]))), data4), ErrUnsupported, 44, "GUID"},
		{"extensible A-law sub-format", riffWave(chunk("fmt ", fmtExt(1, 8000, 8, 8, 4, cat(le16(6), guidPCM[2:]))), data4), ErrUnsupported, 44, "A-law"},
		{"extensible fmt too short", riffWave(chunk("fmt ", cat(fmtStd(0xFFFE, 2, 48000, 16), le16(0))), data4), ErrBadFormat, 16, "40"},
		{"extensible cbSize too small", riffWave(chunk("fmt ", cat(fmtStd(0xFFFE, 2, 48000, 16), le16(10), make([]byte, 22))), data4), ErrBadFormat, 36, "cbSize"},
		{"valid bits exceed container", riffWave(chunk("fmt ", fmtExt(1, 48000, 16, 24, 4, guidPCM)), data4), ErrBadFormat, 38, "valid bits"},
		{"zero channels", riffWave(chunk("fmt ", fmtBody(1, 0, 44100, 0, 0, 16)), data4), ErrBadFormat, 22, "0 channels"},
		{"nine channels", riffWave(chunk("fmt ", fmtStd(1, 9, 44100, 16)), data4), ErrUnsupported, 22, "9 channels"},
		{"zero sample rate", riffWave(chunk("fmt ", fmtStd(1, 2, 0, 16)), data4), ErrBadFormat, 24, "0 Hz"},
		{"rate below 8 kHz", riffWave(chunk("fmt ", fmtStd(1, 2, 4000, 16)), data4), ErrUnsupported, 24, "4000"},
		{"rate above 384 kHz", riffWave(chunk("fmt ", fmtStd(1, 2, 768000, 16)), data4), ErrUnsupported, 24, "768000"},
		{"block align mismatch", riffWave(chunk("fmt ", fmtBody(1, 2, 44100, 176400, 2, 16)), data4), ErrBadFormat, 32, "block align 2, want 4"},
		{"fmt chunk shorter than 16", riffWave(chunk("fmt ", fmtStd(1, 2, 44100, 16)[:14]), data4), ErrBadFormat, 16, "14 bytes"},
		{"second fmt chunk", riffWave(pcm16, pcm16, data4), ErrBadFormat, 36, "second"},
		{"data not whole frames", riffWave(pcm16, chunk("data", make([]byte, 6))), ErrBadFormat, 40, "multiple"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := NewReader(bytes.NewReader(tc.file))
			if err == nil {
				t.Fatalf("NewReader succeeded (%+v), want %v", r.Format(), tc.kind)
			}
			if !errors.Is(err, tc.kind) {
				t.Fatalf("err = %v, want %v", err, tc.kind)
			}
			var fe *FormatError
			if !errors.As(err, &fe) {
				t.Fatalf("err %T is not *FormatError", err)
			}
			if tc.offset != -2 && fe.Offset != tc.offset {
				t.Errorf("offset %d, want %d (%v)", fe.Offset, tc.offset, err)
			}
			msg := err.Error()
			if strings.ContainsAny(msg, "\r\n") || !strings.HasPrefix(msg, "wavio: ") || !strings.Contains(msg, tc.msgContain) {
				t.Errorf("message %q: want one line starting \"wavio: \" containing %q", msg, tc.msgContain)
			}
		})
	}
}

// TestTruncatedDuringRead cuts a file after NewReader has checked its size,
// as a concurrent writer or a failing disk would, and expects the whole
// frames before the cut followed by ErrTruncated at the cut's byte offset,
// with the file name in the message.
func TestTruncatedDuringRead(t *testing.T) {
	name := filepath.Join(t.TempDir(), "cut.wav")
	body := make([]byte, 4*1000) // 1000 stereo 16-bit frames
	for i := range body {
		body[i] = byte(i * 7)
	}
	file := riffWave(chunk("fmt ", fmtStd(1, 2, 44100, 16)), chunk("data", body))
	if err := os.WriteFile(name, file, 0o644); err != nil {
		t.Fatal(err)
	}
	r, err := Open(name)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	const headerLen = 44
	cut := int64(headerLen + 4*300 + 2) // 300 whole frames and half of the next
	if err := os.Truncate(name, cut); err != nil {
		t.Fatal(err)
	}
	dst := make([]float64, 256)
	total := 0
	for {
		n, err := r.Read(dst)
		total += n
		if err == nil {
			continue
		}
		var fe *FormatError
		if !errors.Is(err, ErrTruncated) || !errors.As(err, &fe) {
			t.Fatalf("err = %v, want ErrTruncated", err)
		}
		if fe.Offset != cut || fe.Path != name || !strings.Contains(err.Error(), name) {
			t.Errorf("offset %d path %q, want %d %q (%v)", fe.Offset, fe.Path, cut, name, err)
		}
		break
	}
	if total != 600 {
		t.Errorf("delivered %d samples before the cut, want 600", total)
	}
}

func TestShortDst(t *testing.T) {
	file := riffWave(chunk("fmt ", fmtStd(1, 2, 44100, 16)), chunk("data", make([]byte, 8)))
	r, err := NewReader(bytes.NewReader(file))
	if err != nil {
		t.Fatal(err)
	}
	if n, err := r.Read(make([]float64, 1)); n != 0 || err != io.ErrShortBuffer {
		t.Errorf("Read(1 sample) on stereo = %d, %v; want 0, io.ErrShortBuffer", n, err)
	}
	if n, err := r.Read(nil); n != 0 || err != nil {
		t.Errorf("Read(nil) = %d, %v; want 0, nil", n, err)
	}
}

// TestNonZeroStart parses a WAVE stream that starts part-way into a
// ReadSeeker; offsets are relative to the start position.
func TestNonZeroStart(t *testing.T) {
	prefix := []byte("0123456789")
	file := riffWave(chunk("fmt ", fmtStd(1, 1, 44100, 16)), chunk("data", cat(le16(0x4000), le16(0x2000))))
	rs := bytes.NewReader(cat(prefix, file))
	rs.Seek(int64(len(prefix)), io.SeekStart)
	r, err := NewReader(rs)
	if err != nil {
		t.Fatal(err)
	}
	got, err := readAll(t, r, 16)
	if err != nil || len(got) != 2 || got[0] != 0.5 || got[1] != 0.25 {
		t.Fatalf("got %v, %v; want [0.5 0.25]", got, err)
	}
}

// TestReadConstantMemory streams a 10 s stereo 24-bit file through a small
// dst buffer and requires zero allocations per Read after warm-up, and a
// block buffer no larger than readBufBytes however long the file.
func TestReadConstantMemory(t *testing.T) {
	const rate, ch, seconds = 48000, 2, 10
	var m memWS
	w, err := NewWriter(&m, Format{SampleRate: rate, Channels: ch, BitDepth: 24})
	if err != nil {
		t.Fatal(err)
	}
	src := make([]float64, rate*ch)
	for i := range src {
		src[i] = math.Sin(float64(i) * 0.001)
	}
	for range seconds {
		if err := w.Write(src); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	r, err := NewReader(bytes.NewReader(m.b))
	if err != nil {
		t.Fatal(err)
	}
	if len(r.buf) > readBufBytes {
		t.Errorf("block buffer %d bytes, want <= %d", len(r.buf), readBufBytes)
	}
	dst := make([]float64, 64)
	total := 0
	for range 10 { // warm-up
		n, _ := r.Read(dst)
		total += n
	}
	allocs := testing.AllocsPerRun(2000, func() {
		n, err := r.Read(dst)
		if err != nil {
			t.Fatal(err)
		}
		total += n
	})
	if allocs != 0 {
		t.Errorf("Read allocates %v times per call, want 0", allocs)
	}
	rest, err := readAll(t, r, 64)
	if err != nil {
		t.Fatal(err)
	}
	total += len(rest)
	if want := rate * ch * seconds; total != want {
		t.Errorf("streamed %d samples, want %d", total, want)
	}
}

// FuzzNewReader checks that no input makes the reader panic, return a
// partial frame or a multi-line error. The seed corpus runs in go test.
func FuzzNewReader(f *testing.F) {
	f.Add(riffWave(chunk("fmt ", fmtStd(1, 2, 44100, 16)), chunk("data", make([]byte, 8))))
	f.Add(riffWave(chunk("fmt ", fmtExt(2, 48000, 24, 24, 3, guidPCM)), chunk("data", make([]byte, 12))))
	f.Add(riffWave(chunk("fmt ", fmtStd(3, 1, 48000, 32)), chunk("data", le32(0x7FC00000))))
	f.Add(riffWave(chunk("LIST", []byte("INFOx")), chunk("fmt ", fmtStd(1, 1, 8000, 8)), chunkSized("data", 99, []byte{1})))
	f.Add([]byte("RIFF"))
	f.Fuzz(func(t *testing.T, data []byte) {
		r, err := NewReader(bytes.NewReader(data))
		if err != nil {
			if strings.ContainsAny(err.Error(), "\r\n") {
				t.Fatalf("multi-line error %q", err)
			}
			return
		}
		dst := make([]float64, 3*r.Format().Channels)
		for {
			n, err := r.Read(dst)
			if n%r.Format().Channels != 0 {
				t.Fatalf("partial frame: %d samples", n)
			}
			if err != nil {
				return
			}
		}
	})
}

func BenchmarkRead(b *testing.B) {
	for _, f := range []Format{
		{SampleRate: 48000, Channels: 2, BitDepth: 16},
		{SampleRate: 48000, Channels: 2, BitDepth: 24},
		{SampleRate: 48000, Channels: 2, BitDepth: 32, Float: true},
	} {
		b.Run(f.String(), func(b *testing.B) {
			var m memWS
			w, _ := NewWriter(&m, f)
			src := make([]float64, 48000*2)
			w.Write(src)
			w.Close()
			dst := make([]float64, 1024)
			// One op is one Read of 1024 samples; the reader is re-opened
			// at the end of the 1 s file, amortising NewReader's allocations.
			b.SetBytes(int64(len(dst) * f.BitDepth / 8))
			b.ReportAllocs()
			rs := bytes.NewReader(m.b)
			r, _ := NewReader(rs)
			for b.Loop() {
				if _, err := r.Read(dst); err == io.EOF {
					rs.Seek(0, io.SeekStart)
					r, _ = NewReader(rs)
				} else if err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
