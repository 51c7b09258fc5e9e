package wavio

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"
)

// writeBufBytes is the size of a Writer's block buffer.
const writeBufBytes = 16 << 10

// Channel masks (dwChannelMask) written in EXTENSIBLE headers: front centre
// for mono, front left | front right for stereo, and 0 ("no speaker
// assignment") for 3 to 8 channels, which this package treats as plain
// multitrack data.
const (
	maskMono   = 0x4
	maskStereo = 0x3
)

// Writer encodes interleaved float64 samples as a WAVE stream.
//
// Header choice. Following the recommendation in Microsoft's "Multiple
// Channel Audio Data and WAVE Files", WAVE_FORMAT_EXTENSIBLE (tag 0xFFFE,
// 40-byte fmt chunk) is written when the data has more than 2 channels or
// is integer PCM deeper than 16 bits. 16-bit PCM mono or stereo uses the
// plain PCM tag 1 with a 16-byte fmt chunk, and float mono or stereo the
// plain IEEE float tag 3 with an 18-byte fmt chunk (cbSize 0). Every
// non-tag-1 file carries a "fact" chunk holding the frame count, as the
// RIFF/WAVE specification asks of formats other than PCM.
//
// Quantisation. Integer PCM is written as round(x·2^(bits-1)) with ties
// rounded away from zero (math.Round), no dither, clamped to
// [-2^(bits-1), 2^(bits-1)-1]. A sample that needed clamping is counted in
// Clipped; note that +1.0 itself is one LSB above positive full scale and
// counts. Float output stores the value as is (float32 output rounds to
// nearest even, IEEE 754).
//
// Non-finite samples (NaN, ±Inf) are refused in every format, as are
// values beyond the float32 range in float32 output: Write returns a
// *SampleError and writes nothing of that call.
type Writer struct {
	w         io.Writer
	ws        io.Seeker // nil for a stream writer
	f         Format
	ext       bool // EXTENSIBLE header
	enc       int
	bps       int   // bytes per sample
	base      int64 // offset of "RIFF" in w
	hdrLen    int64 // bytes from "RIFF" to the first sample byte
	factOff   int64 // offset of the fact sample-length field from base, or 0
	maxData   int64 // largest data size that keeps every RIFF size in 32 bits
	dataBytes int64
	frames    int64
	clipped   int64
	expect    int64 // frames announced by NewStreamWriter; -1 otherwise
	buf       []byte
	closed    bool
	err       error // sticky I/O error
}

// NewWriter validates f, writes a WAVE header at the current position of w
// and returns a Writer for the sample data; Close seeks back to fill in the
// sizes. Accepted formats: integer PCM of 16, 24 or 32 bits, IEEE float of
// 32 or 64 bits; 1 to MaxChannels channels; MinSampleRate to MaxSampleRate
// Hz. Faults are *FormatError with Offset -1.
func NewWriter(w io.WriteSeeker, f Format) (*Writer, error) {
	if err := checkWriteFormat(f); err != nil {
		return nil, err
	}
	base, err := w.Seek(0, io.SeekCurrent)
	if err != nil {
		return nil, fmt.Errorf("wavio: %w", err)
	}
	wr := newWriter(w, f, 0)
	wr.ws, wr.base = w, base
	if _, err := w.Write(wr.header(0)); err != nil {
		return nil, fmt.Errorf("wavio: writing header: %w", err)
	}
	return wr, nil
}

// NewStreamWriter is NewWriter for a destination that cannot seek (a FIFO,
// a pipe, a terminal, a device written in place): the header is written
// once, up front, with the sizes of exactly frames frames, and Close fails
// with ErrFrameCount unless exactly that many were written (a Write past
// them is refused before any of it is written). A consumer at the other end
// of a pipe that is cut short sees a data chunk longer than the stream,
// which a reader reports as truncated.
func NewStreamWriter(w io.Writer, f Format, frames int64) (*Writer, error) {
	if err := checkWriteFormat(f); err != nil {
		return nil, err
	}
	wr := newWriter(w, f, frames)
	data := frames * int64(f.blockAlign())
	if frames < 0 || data > wr.maxData {
		return nil, fmtErr(-1, ErrTooLarge, fmt.Sprintf("%d frames of %d bytes", frames, f.blockAlign()))
	}
	wr.expect = frames
	if _, err := w.Write(wr.header(data)); err != nil {
		return nil, fmt.Errorf("wavio: writing header: %w", err)
	}
	return wr, nil
}

func checkWriteFormat(f Format) error {
	if err := checkShape(f, -1, -1); err != nil {
		return err
	}
	if err := checkEncoding(f); err != nil {
		return fmtErr(-1, ErrUnsupported, err.Error())
	}
	if !f.Float && f.BitDepth == 8 {
		return fmtErr(-1, ErrUnsupported, "8-bit PCM output (write 16, 24 or 32)")
	}
	return nil
}

// newWriter lays out the header of f (see Writer) without writing it.
func newWriter(w io.Writer, f Format, frames int64) *Writer {
	ext := f.Channels > 2 || (!f.Float && f.BitDepth > 16)
	fmtLen := int64(16)
	switch {
	case ext:
		fmtLen = 40
	case f.Float:
		fmtLen = 18
	}
	hdrLen := 12 + 8 + fmtLen + 8 // RIFF header, fmt chunk, data chunk header
	var factOff int64
	if ext || f.Float {
		factOff = 12 + 8 + fmtLen + 8 // the fact chunk's sample-length field
		hdrLen += 12
	}
	align := f.blockAlign()
	return &Writer{
		w: w, f: f, enc: encodingOf(f), bps: f.bytesPerSample(), hdrLen: hdrLen, factOff: factOff, ext: ext,
		// RIFF size = hdrLen - 8 + data + pad must fit in a uint32.
		maxData: math.MaxUint32 - (hdrLen - 8) - 1,
		buf:     make([]byte, max(1, writeBufBytes/align)*align),
		expect:  -1,
	}
}

// header returns the header bytes for dataBytes bytes of samples.
func (w *Writer) header(dataBytes int64) []byte {
	f := w.f
	h := make([]byte, 0, w.hdrLen)
	le16 := func(v int) { h = binary.LittleEndian.AppendUint16(h, uint16(v)) }
	le32 := func(v int64) { h = binary.LittleEndian.AppendUint32(h, uint32(v)) }
	align := f.blockAlign()
	tag := uint16(tagPCM)
	if f.Float {
		tag = tagFloat
	}
	h = append(h, "RIFF"...)
	le32(w.hdrLen - 8 + dataBytes + dataBytes&1)
	h = append(h, "WAVE"...)
	h = append(h, "fmt "...)
	switch {
	case w.ext:
		le32(40)
		le16(tagExtensible)
	case f.Float:
		le32(18)
		le16(int(tag))
	default:
		le32(16)
		le16(int(tag))
	}
	le16(f.Channels)
	le32(int64(f.SampleRate))
	le32(int64(f.SampleRate) * int64(align)) // nAvgBytesPerSec
	le16(align)
	le16(f.BitDepth)
	switch {
	case w.ext:
		le16(22)         // cbSize
		le16(f.BitDepth) // wValidBitsPerSample
		switch f.Channels {
		case 1:
			le32(maskMono)
		case 2:
			le32(maskStereo)
		default:
			le32(0)
		}
		le16(int(tag)) // SubFormat: KSDATAFORMAT_SUBTYPE_PCM or _IEEE_FLOAT
		h = append(h, guidTail[:]...)
	case f.Float:
		le16(0) // cbSize
	}
	if w.factOff != 0 {
		h = append(h, "fact"...)
		le32(4)
		le32(dataBytes / int64(align)) // dwSampleLength
	}
	h = append(h, "data"...)
	le32(dataBytes)
	return h
}

// Format returns the format being written.
func (w *Writer) Format() Format { return w.f }

// Frames returns the number of frames written so far.
func (w *Writer) Frames() int64 { return w.frames }

// Clipped returns the number of PCM samples clamped to full scale so far.
func (w *Writer) Clipped() int64 { return w.clipped }

// Write encodes src, interleaved, whose length must be a multiple of the
// channel count. It validates all of src before writing any of it. Write
// does not allocate.
func (w *Writer) Write(src []float64) error {
	if w.closed {
		return fmtErr(-1, ErrClosed, "Write after Close")
	}
	if w.err != nil {
		return w.err
	}
	ch := w.f.Channels
	if len(src)%ch != 0 {
		return fmtErr(-1, ErrPartialFrame, fmt.Sprintf("%d samples is not a whole number of %d-channel frames", len(src), ch))
	}
	for i, v := range src {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return &SampleError{Frame: w.frames + int64(i/ch), Channel: i % ch, Value: v, Reason: "refused on write"}
		}
		if w.enc == encF32 && math.IsInf(float64(float32(v)), 0) {
			return &SampleError{Frame: w.frames + int64(i/ch), Channel: i % ch, Value: v, Kind: ErrRange,
				Reason: "32-bit float holds at most ±3.4028235e+38"}
		}
	}
	if w.expect >= 0 && w.frames+int64(len(src)/ch) > w.expect {
		return fmtErr(-1, ErrFrameCount, fmt.Sprintf("the header announced %d frames; %d written, %d more requested", w.expect, w.frames, len(src)/ch))
	}
	if w.dataBytes+int64(len(src))*int64(w.bps) > w.maxData {
		return fmtErr(-1, ErrTooLarge, fmt.Sprintf("%d data bytes written, %d more requested", w.dataBytes, len(src)*w.bps))
	}
	per := len(w.buf) / w.bps
	for len(src) > 0 {
		k := min(per, len(src))
		b := w.encode(w.buf[:k*w.bps], src[:k])
		if _, err := w.w.Write(b); err != nil {
			w.err = fmt.Errorf("wavio: writing data at offset %d: %w", w.hdrLen+w.dataBytes, err)
			return w.err
		}
		w.dataBytes += int64(len(b))
		src = src[k:]
	}
	w.frames = w.dataBytes / int64(w.bps*ch)
	return nil
}

// encode converts src into dst (len(src)*bps bytes) and returns dst.
func (w *Writer) encode(dst []byte, src []float64) []byte {
	switch w.enc {
	case encS16:
		for i, v := range src {
			binary.LittleEndian.PutUint16(dst[2*i:], uint16(int16(w.quantize(v, 1<<15))))
		}
	case encS24:
		for i, v := range src {
			q := uint32(int32(w.quantize(v, 1<<23)))
			j := 3 * i
			dst[j], dst[j+1], dst[j+2] = byte(q), byte(q>>8), byte(q>>16)
		}
	case encS32:
		for i, v := range src {
			binary.LittleEndian.PutUint32(dst[4*i:], uint32(int32(w.quantize(v, 1<<31))))
		}
	case encF32:
		for i, v := range src {
			binary.LittleEndian.PutUint32(dst[4*i:], math.Float32bits(float32(v)))
		}
	case encF64:
		for i, v := range src {
			binary.LittleEndian.PutUint64(dst[8*i:], math.Float64bits(v))
		}
	}
	return dst
}

// quantize maps v in [-1, 1) to an integer code in [-scale, scale-1],
// rounding half away from zero and counting clamps.
func (w *Writer) quantize(v, scale float64) int64 {
	q := math.Round(v * scale)
	switch {
	case q > scale-1:
		w.clipped++
		return int64(scale - 1)
	case q < -scale:
		w.clipped++
		return int64(-scale)
	}
	return int64(q)
}

// Close writes the pad byte an odd-sized data chunk needs, patches the RIFF,
// fact and data sizes, and leaves w positioned at the end of the stream. It
// does not close w. Calling Close again does nothing. A stream writer
// (NewStreamWriter) patches nothing; its Close returns ErrFrameCount when
// fewer frames were written than its header announced.
func (w *Writer) Close() error {
	if w.closed {
		return nil
	}
	w.closed = true
	if w.err != nil {
		return w.err
	}
	if w.expect >= 0 && w.frames != w.expect {
		return fmtErr(-1, ErrFrameCount, fmt.Sprintf("the header announced %d frames, %d were written", w.expect, w.frames))
	}
	end := w.base + w.hdrLen + w.dataBytes
	if w.dataBytes%2 == 1 {
		if _, err := w.w.Write([]byte{0}); err != nil {
			return fmt.Errorf("wavio: writing pad byte: %w", err)
		}
		end++
	}
	if w.ws == nil {
		return nil
	}
	patch := func(off, v int64) error {
		if _, err := w.ws.Seek(w.base+off, io.SeekStart); err != nil {
			return fmt.Errorf("wavio: %w", err)
		}
		var b [4]byte
		binary.LittleEndian.PutUint32(b[:], uint32(v))
		if _, err := w.w.Write(b[:]); err != nil {
			return fmt.Errorf("wavio: patching header at offset %d: %w", off, err)
		}
		return nil
	}
	if err := patch(4, end-w.base-8); err != nil {
		return err
	}
	if w.factOff != 0 {
		if err := patch(w.factOff, w.frames); err != nil {
			return err
		}
	}
	if err := patch(w.hdrLen-4, w.dataBytes); err != nil {
		return err
	}
	if _, err := w.ws.Seek(end, io.SeekStart); err != nil {
		return fmt.Errorf("wavio: %w", err)
	}
	return nil
}
