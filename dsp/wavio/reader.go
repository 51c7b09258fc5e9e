package wavio

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"
)

// readBufBytes is the size of a Reader's block buffer, before rounding down
// to whole frames. It bounds the Reader's memory regardless of file length.
const readBufBytes = 16 << 10

// maxFmtBytes is how much of a fmt chunk is parsed; WAVEFORMATEXTENSIBLE
// is 40 bytes and anything beyond is skipped.
const maxFmtBytes = 40

// sample encodings, resolved once so that Read switches only once per block.
const (
	encU8 = iota
	encS16
	encS24
	encS32
	encF32
	encF64
)

// Reader decodes the sample data of one WAVE stream. It holds one fixed
// block buffer, so memory use does not depend on the length of the stream.
type Reader struct {
	r         io.ReadSeeker
	f         Format
	enc       int
	bpf       int   // bytes per frame (block align)
	dataStart int64 // offset of the first sample byte, relative to the RIFF header
	dataSize  int64 // declared data chunk size, bytes
	pos       int64 // data bytes consumed from r
	frame     int64 // frames delivered to the caller
	buf       []byte
	err       error   // sticky: io.EOF or the first fault
	limit     float64 // largest |x| accepted from float data, at most MaxFloat64
	overs     int64   // float samples delivered with |x| > 1
	warnings  []string
}

// DefaultFloatLimit is the largest magnitude a Reader accepts from float
// sample data unless SetFloatLimit changes it: 10^(24/20) ≈ 15.85, that is
// +24 dBFS, with 1.0 as digital full scale (the float convention of the
// WAVE format, from memory; the same full scale integer PCM decodes to).
// Float files from audio software may go a few dB over full scale (a mix
// bus that clipped, an effect's overshoot), so moderate overs pass and are
// counted (Overs); 24 dB over is far beyond any such overshoot, and
// feeding a circuit model a sample of 1e30 makes every later sample wrong
// without an error. The bound is also what keeps one absurd sample from
// driving a solver into thousands of non-converged steps.
const DefaultFloatLimit = 15.848931924611133

// DefaultFloatLimitDB is DefaultFloatLimit in dB relative to full scale.
const DefaultFloatLimitDB = 24.0

// NewReader parses the RIFF/WAVE header at the current position of r,
// checks it, and positions r at the first sample. Offsets in errors are
// relative to that starting position.
//
// Chunks other than "fmt " and "data" (LIST, fact, cue, JUNK, ...) are
// skipped wherever they appear; a "data" chunk that precedes "fmt " is
// accepted. The RIFF size field is not trusted (streaming writers often
// leave it wrong); the chunk walk ends at the end of the stream. r is seeked
// to its end once to detect a data chunk that runs past the end of the
// stream, which is reported as ErrTruncated before any sample is read.
func NewReader(r io.ReadSeeker) (*Reader, error) {
	base, err := r.Seek(0, io.SeekCurrent)
	if err != nil {
		return nil, fmt.Errorf("wavio: %w", err)
	}
	end, err := r.Seek(0, io.SeekEnd)
	if err != nil {
		return nil, fmt.Errorf("wavio: %w", err)
	}
	end -= base
	if _, err := r.Seek(base, io.SeekStart); err != nil {
		return nil, fmt.Errorf("wavio: %w", err)
	}

	var hdr [12]byte
	n, err := io.ReadFull(r, hdr[:])
	if err != nil && err != io.EOF && err != io.ErrUnexpectedEOF {
		return nil, fmt.Errorf("wavio: reading RIFF header: %w", err)
	}
	switch {
	case n == 0:
		return nil, fmtErr(0, ErrEmpty, "stream has no bytes")
	case n >= 4 && string(hdr[:4]) == "RIFX":
		return nil, fmtErr(0, ErrUnsupported, "big-endian RIFX container")
	case n >= 4 && string(hdr[:4]) == "RF64":
		return nil, fmtErr(0, ErrUnsupported, "RF64 64-bit container")
	case n < 4 || string(hdr[:4]) != "RIFF":
		return nil, fmtErr(0, ErrNotWAVE, fmt.Sprintf("stream starts with %q, want \"RIFF\"", hdr[:min(n, 4)]))
	case n < 12:
		return nil, fmtErr(int64(n), ErrTruncated, "stream ends inside the 12-byte RIFF header")
	case string(hdr[8:12]) != "WAVE":
		return nil, fmtErr(8, ErrNotWAVE, fmt.Sprintf("RIFF form type %q, want \"WAVE\"", hdr[8:12]))
	}

	var (
		f                 Format
		haveFmt, haveData bool
		dataOff, dataSize int64
		off               = int64(12) // offset of the next chunk header
		lastID            [4]byte
		lastOff           int64
		lastSize          = int64(-1)
		warnings          []string
		fmtBody           [maxFmtBytes]byte
		chunkHdr          [8]byte
		dataSizeFieldOff  int64
	)
	for !(haveFmt && haveData) {
		if off+8 > end {
			break // no room for another chunk header
		}
		if _, err := r.Seek(base+off, io.SeekStart); err != nil {
			return nil, fmt.Errorf("wavio: %w", err)
		}
		if _, err := io.ReadFull(r, chunkHdr[:]); err != nil {
			if err == io.EOF || err == io.ErrUnexpectedEOF {
				break
			}
			return nil, fmt.Errorf("wavio: reading chunk header at offset %d: %w", off, err)
		}
		id := [4]byte(chunkHdr[:4])
		if !validChunkID(id) && lastSize%2 == 1 && off > 12 {
			// Writers that forget the pad byte after an odd-sized chunk
			// put the next header one byte early. Take it there when that
			// is a proper chunk id and this is not.
			var early [8]byte
			if _, err := r.Seek(base+off-1, io.SeekStart); err == nil {
				if _, err := io.ReadFull(r, early[:]); err == nil && validChunkID([4]byte(early[:4])) {
					warnings = append(warnings, fmt.Sprintf("chunk %q at offset %d (%d bytes, odd) lacks its pad byte; read as if padded", lastID[:], lastOff, lastSize))
					off--
					chunkHdr = early
					id = [4]byte(chunkHdr[:4])
				}
			}
		}
		if !validChunkID(id) {
			what := "the RIFF header"
			if lastSize >= 0 {
				what = fmt.Sprintf("chunk %q at offset %d, which declares %d bytes", lastID[:], lastOff, lastSize)
			}
			return nil, fmtErr(off, ErrBadFormat, fmt.Sprintf("bytes %q are not a chunk id; the stream is damaged after %s", id[:], what))
		}
		size := int64(binary.LittleEndian.Uint32(chunkHdr[4:]))
		body := off + 8
		lastID, lastOff, lastSize = id, off, size
		switch string(id[:]) {
		case "fmt ":
			if haveFmt {
				return nil, fmtErr(off, ErrBadFormat, "second fmt chunk")
			}
			if size < 16 {
				return nil, fmtErr(off+4, ErrBadFormat, fmt.Sprintf("fmt chunk is %d bytes, need at least 16", size))
			}
			k := min(size, maxFmtBytes)
			if body+k > end {
				return nil, fmtErr(end, ErrTruncated, fmt.Sprintf("stream ends inside the fmt chunk at offset %d", off))
			}
			if _, err := io.ReadFull(r, fmtBody[:k]); err != nil {
				return nil, fmt.Errorf("wavio: reading fmt chunk at offset %d: %w", off, err)
			}
			f, err = parseFmt(fmtBody[:k], size, body)
			if err != nil {
				return nil, err
			}
			haveFmt = true
		case "data":
			if !haveData {
				dataOff, dataSize, haveData = body, size, true
				dataSizeFieldOff = off + 4
			}
		}
		off = body + size + size&1 // chunks are padded to even length
	}

	if !haveFmt || !haveData {
		if off > end {
			// The walk stepped past the end: the last chunk is cut short.
			return nil, fmtErr(end, ErrTruncated, fmt.Sprintf("chunk %q at offset %d declares %d bytes, stream ends at offset %d", lastID[:], lastOff, lastSize, end))
		}
		if !haveFmt {
			return nil, fmtErr(end, ErrNoFmt, "no \"fmt \" chunk before end of stream")
		}
		return nil, fmtErr(end, ErrNoData, "no \"data\" chunk before end of stream")
	}
	if dataOff+dataSize > end {
		return nil, fmtErr(end, ErrTruncated, fmt.Sprintf("data chunk at offset %d declares %d bytes, stream ends after %d", dataOff-8, dataSize, max(end-dataOff, 0)))
	}
	bpf := f.blockAlign()
	if dataSize%int64(bpf) != 0 {
		return nil, fmtErr(dataSizeFieldOff, ErrBadFormat, fmt.Sprintf("data chunk size %d is not a multiple of the %d-byte frame", dataSize, bpf))
	}
	if _, err := r.Seek(base+dataOff, io.SeekStart); err != nil {
		return nil, fmt.Errorf("wavio: %w", err)
	}

	d := &Reader{r: r, f: f, bpf: bpf, dataStart: dataOff, dataSize: dataSize, limit: DefaultFloatLimit, warnings: warnings}
	d.enc = encodingOf(f)
	frames := max(1, readBufBytes/bpf)
	if total := dataSize / int64(bpf); total < int64(frames) {
		frames = max(1, int(total))
	}
	d.buf = make([]byte, frames*bpf)
	return d, nil
}

func encodingOf(f Format) int {
	if f.Float {
		if f.BitDepth == 64 {
			return encF64
		}
		return encF32
	}
	switch f.BitDepth {
	case 8:
		return encU8
	case 16:
		return encS16
	case 24:
		return encS24
	}
	return encS32
}

// parseFmt decodes a fmt chunk body b (at most maxFmtBytes of it); size is
// the declared chunk size and body the stream offset of b[0].
func parseFmt(b []byte, size, body int64) (Format, error) {
	le16 := func(i int) int { return int(binary.LittleEndian.Uint16(b[i:])) }
	le32 := func(i int) int64 { return int64(binary.LittleEndian.Uint32(b[i:])) }
	tag := uint16(le16(0))
	f := Format{Channels: le16(2), BitDepth: le16(14)}
	rate := le32(4)
	align := le16(12)
	validBits := 0
	switch tag {
	case tagPCM:
	case tagFloat:
		f.Float = true
	case tagExtensible:
		if size < 40 {
			return f, fmtErr(body-4, ErrBadFormat, fmt.Sprintf("EXTENSIBLE fmt chunk is %d bytes, need 40", size))
		}
		if cb := le16(16); cb < 22 {
			return f, fmtErr(body+16, ErrBadFormat, fmt.Sprintf("EXTENSIBLE cbSize %d, need 22", cb))
		}
		validBits = le16(18)
		guid := b[24:40]
		if [14]byte(guid[2:]) != guidTail {
			return f, fmtErr(body+24, ErrUnsupported, "EXTENSIBLE sub-format GUID "+guidString(guid))
		}
		switch sub := uint16(le16(24)); sub {
		case tagPCM:
		case tagFloat:
			f.Float = true
		default:
			return f, fmtErr(body+24, ErrUnsupported, "EXTENSIBLE sub-format "+tagName(sub))
		}
	default:
		return f, fmtErr(body, ErrUnsupported, "format tag "+tagName(tag))
	}
	if rate > MaxSampleRate {
		// Checked here, before the conversion to int, so that the message
		// gives the rate the file declares (up to 4294967295 Hz).
		return f, fmtErr(body+4, ErrUnsupported, fmt.Sprintf("sample rate %d Hz (accepted %d to %d Hz)", rate, MinSampleRate, MaxSampleRate))
	}
	f.SampleRate = int(rate)
	if err := checkShape(f, body+2, body+4); err != nil {
		return f, err
	}
	if err := checkEncoding(f); err != nil {
		return f, fmtErr(body+14, ErrUnsupported, err.Error())
	}
	if validBits > f.BitDepth {
		return f, fmtErr(body+18, ErrBadFormat, fmt.Sprintf("%d valid bits in a %d-bit container", validBits, f.BitDepth))
	}
	if want := f.blockAlign(); align != want {
		return f, fmtErr(body+12, ErrBadFormat, fmt.Sprintf("block align %d, want %d for %d channels of %d bits", align, want, f.Channels, f.BitDepth))
	}
	return f, nil
}

// validChunkID reports whether id is a FOURCC: four printable ASCII
// characters, space-padded (RIFF specification, 1991).
func validChunkID(id [4]byte) bool {
	for _, c := range id {
		if c < 0x20 || c > 0x7E {
			return false
		}
	}
	return true
}

func guidString(g []byte) string {
	return fmt.Sprintf("{%08X-%04X-%04X-%X-%X}",
		binary.LittleEndian.Uint32(g[0:]), binary.LittleEndian.Uint16(g[4:]),
		binary.LittleEndian.Uint16(g[6:]), g[8:10], g[10:16])
}

// Format returns the stream's sample format. For an EXTENSIBLE stream
// whose valid bits are fewer than the container (say 20 in 24), BitDepth is
// the container size: the samples are left-justified, so scaling by the
// container is exact.
func (d *Reader) Format() Format { return d.f }

// Frames returns the number of frames the data chunk holds.
func (d *Reader) Frames() int64 { return d.dataSize / int64(d.bpf) }

// SetFloatLimit sets the largest magnitude accepted from float sample data
// (DefaultFloatLimit until set); a sample beyond it stops Read with a
// *SampleError wrapping ErrOverLimit. +Inf accepts every finite value.
// Integer PCM cannot exceed full scale and is not affected. A limit that is
// not above zero is refused.
func (d *Reader) SetFloatLimit(peak float64) error {
	if !(peak > 0) {
		return fmtErr(-1, ErrBadFormat, fmt.Sprintf("float limit %g: want a level above 0", peak))
	}
	d.limit = min(peak, math.MaxFloat64)
	return nil
}

// Overs returns how many float samples delivered so far were beyond full
// scale (|x| > 1) but within the limit, for a report to mention.
func (d *Reader) Overs() int64 { return d.overs }

// Warnings returns what the header walk tolerated (such as a missing pad
// byte), one line each, for a report to mention.
func (d *Reader) Warnings() []string { return d.warnings }

// Read decodes up to len(dst) samples into dst, interleaved, and returns
// the number of samples written, always a whole number of frames. It fills
// dst unless the data ends first. Integer PCM is scaled to [-1, 1) by
// 2^-(bits-1) (8-bit data is unsigned with offset 128); float data is passed
// through unscaled.
//
// At the end of the data Read returns 0, io.EOF. If the stream ends early it
// returns the whole frames that were present together with a *FormatError
// wrapping ErrTruncated; a NaN or infinite float sample stops decoding just
// before its frame with a *SampleError wrapping ErrNonFinite, and a float
// sample beyond the limit (SetFloatLimit, DefaultFloatLimit) with one
// wrapping ErrOverLimit, naming frame and channel, so a render stops before
// the sample reaches the circuit. Errors are sticky. A dst shorter than one frame gives io.ErrShortBuffer.
//
// Read does not allocate.
func (d *Reader) Read(dst []float64) (int, error) {
	if d.err != nil {
		return 0, d.err
	}
	ch := d.f.Channels
	maxFrames := len(dst) / ch
	if maxFrames == 0 {
		if len(dst) == 0 {
			return 0, nil
		}
		return 0, io.ErrShortBuffer
	}
	if d.pos >= d.dataSize {
		d.err = io.EOF
		return 0, io.EOF
	}
	n := 0 // frames written to dst
	bufFrames := len(d.buf) / d.bpf
	for n < maxFrames && d.pos < d.dataSize {
		left := int(min((d.dataSize-d.pos)/int64(d.bpf), int64(bufFrames)))
		want := min(maxFrames-n, left)
		b := d.buf[:want*d.bpf]
		m, rerr := io.ReadFull(d.r, b)
		got := m / d.bpf
		k, bad, badVal := d.decode(dst[n*ch:(n+got)*ch], b[:got*d.bpf])
		if k < got {
			d.err = d.sampleError(d.frame+int64(k), bad, badVal)
			d.frame += int64(k)
			return (n + k) * ch, d.err
		}
		n += got
		d.frame += int64(got)
		d.pos += int64(m)
		if rerr != nil {
			if rerr == io.EOF || rerr == io.ErrUnexpectedEOF {
				d.err = fmtErr(d.dataStart+d.pos, ErrTruncated,
					fmt.Sprintf("data chunk declares %d bytes, stream ended after %d", d.dataSize, d.pos))
			} else {
				d.err = fmt.Errorf("wavio: reading data at offset %d: %w", d.dataStart+d.pos, rerr)
			}
			return n * ch, d.err
		}
	}
	return n * ch, nil
}

// sampleError describes the float sample that stopped decoding.
func (d *Reader) sampleError(frame int64, ch int, v float64) *SampleError {
	e := &SampleError{Frame: frame, Channel: ch, Value: v, Reason: fmt.Sprintf("in %d-bit float data", d.f.BitDepth)}
	if !math.IsNaN(v) && !math.IsInf(v, 0) {
		e.Kind = ErrOverLimit
		e.Reason = fmt.Sprintf("float input is accepted up to ±%.4g (%+.1f dBFS); a sample this large means a damaged file or data not scaled to ±1",
			d.limit, 20*math.Log10(d.limit))
	}
	return e
}

// decode converts src to dst (len(dst) samples). It returns the number of
// whole frames decoded; when that is short, the channel and value of the
// float sample that stopped it (non-finite or beyond the limit).
func (d *Reader) decode(dst []float64, src []byte) (frames, badCh int, badVal float64) {
	ch := d.f.Channels
	switch d.enc {
	case encU8:
		for i := range dst {
			dst[i] = (float64(src[i]) - 128) * (1.0 / 128)
		}
	case encS16:
		for i := range dst {
			dst[i] = float64(int16(binary.LittleEndian.Uint16(src[2*i:]))) * (1.0 / (1 << 15))
		}
	case encS24:
		for i := range dst {
			j := 3 * i
			v := int32(uint32(src[j])<<8|uint32(src[j+1])<<16|uint32(src[j+2])<<24) >> 8
			dst[i] = float64(v) * (1.0 / (1 << 23))
		}
	case encS32:
		for i := range dst {
			dst[i] = float64(int32(binary.LittleEndian.Uint32(src[4*i:]))) * (1.0 / (1 << 31))
		}
	case encF32:
		// d.limit is at most MaxFloat64, so the test also fails for ±Inf
		// and, being a comparison, for NaN.
		for i := range dst {
			v := float64(math.Float32frombits(binary.LittleEndian.Uint32(src[4*i:])))
			a := math.Abs(v)
			if !(a <= d.limit) {
				return i / ch, i % ch, v
			}
			if a > 1 {
				d.overs++
			}
			dst[i] = v
		}
	case encF64:
		for i := range dst {
			v := math.Float64frombits(binary.LittleEndian.Uint64(src[8*i:]))
			a := math.Abs(v)
			if !(a <= d.limit) {
				return i / ch, i % ch, v
			}
			if a > 1 {
				d.overs++
			}
			dst[i] = v
		}
	}
	return len(dst) / ch, 0, 0
}

// File is a Reader over a named file; its errors carry the file name.
type File struct {
	*Reader
	f    *os.File
	path string
}

// Open opens the named WAVE file and parses its header.
func Open(name string) (*File, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	r, err := NewReader(f)
	if err != nil {
		f.Close()
		return nil, withPath(err, name)
	}
	return &File{Reader: r, f: f, path: name}, nil
}

// Read is Reader.Read with the file name added to errors.
func (f *File) Read(dst []float64) (int, error) {
	n, err := f.Reader.Read(dst)
	if err != nil && err != io.EOF {
		err = withPath(err, f.path)
	}
	return n, err
}

// Close closes the underlying file.
func (f *File) Close() error { return f.f.Close() }
