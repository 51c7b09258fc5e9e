package wavio

import (
	"encoding/binary"
	"errors"
	"io"
)

// This file builds WAVE streams byte by byte, following the layouts in
// "Multimedia Programming Interface and Data Specifications 1.0" (IBM and
// Microsoft, 1991; RIFF chunks, the WAVE form, PCM fmt) and "Multiple
// Channel Audio Data and WAVE Files" (Microsoft; WAVEFORMATEXTENSIBLE). It
// shares no code with the package under test.

// chunk returns a RIFF chunk: 4-byte id, little-endian uint32 size, body,
// and a zero pad byte when the body length is odd (the size excludes it).
func chunk(id string, body []byte) []byte {
	b := append([]byte(id), le32(uint32(len(body)))...)
	b = append(b, body...)
	if len(body)%2 == 1 {
		b = append(b, 0)
	}
	return b
}

// chunkSized is chunk with a declared size that need not match the body.
func chunkSized(id string, size uint32, body []byte) []byte {
	return append(append([]byte(id), le32(size)...), body...)
}

// riffWave wraps chunks in a "RIFF" header of form "WAVE" with a correct size.
func riffWave(chunks ...[]byte) []byte {
	var body []byte
	for _, c := range chunks {
		body = append(body, c...)
	}
	b := append([]byte("RIFF"), le32(uint32(4+len(body)))...)
	b = append(b, "WAVE"...)
	return append(b, body...)
}

func le16(v uint16) []byte { return binary.LittleEndian.AppendUint16(nil, v) }
func le32(v uint32) []byte { return binary.LittleEndian.AppendUint32(nil, v) }
func le64(v uint64) []byte { return binary.LittleEndian.AppendUint64(nil, v) }

func cat(parts ...[]byte) []byte {
	var b []byte
	for _, p := range parts {
		b = append(b, p...)
	}
	return b
}

// fmtBody is the 16-byte PCMWAVEFORMAT / WAVEFORMAT body: wFormatTag,
// nChannels, nSamplesPerSec, nAvgBytesPerSec, nBlockAlign, wBitsPerSample.
func fmtBody(tag, ch uint16, rate, avg uint32, align, bits uint16) []byte {
	return cat(le16(tag), le16(ch), le32(rate), le32(avg), le16(align), le16(bits))
}

// fmtStd is fmtBody with consistent derived fields.
func fmtStd(tag, ch uint16, rate uint32, bits uint16) []byte {
	align := ch * bits / 8
	return fmtBody(tag, ch, rate, rate*uint32(align), align, bits)
}

// KSDATAFORMAT_SUBTYPE_PCM {00000001-0000-0010-8000-00AA00389B71} and
// KSDATAFORMAT_SUBTYPE_IEEE_FLOAT {00000003-...}, as stored on disk (the
// first three GUID fields little-endian), as given in "Multiple Channel
// Audio Data and WAVE Files".
var (
	guidPCM   = []byte{0x01, 0x00, 0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xAA, 0x00, 0x38, 0x9B, 0x71}
	guidFloat = []byte{0x03, 0x00, 0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xAA, 0x00, 0x38, 0x9B, 0x71}
)

// fmtExt is the 40-byte WAVEFORMATEXTENSIBLE body: the 16-byte WAVEFORMATEX
// head with wFormatTag 0xFFFE, cbSize 22, wValidBitsPerSample,
// dwChannelMask and the 16-byte SubFormat GUID.
func fmtExt(ch uint16, rate uint32, bits, valid uint16, mask uint32, guid []byte) []byte {
	align := ch * bits / 8
	return cat(fmtBody(0xFFFE, ch, rate, rate*uint32(align), align, bits),
		le16(22), le16(valid), le32(mask), guid)
}

// memWS is an in-memory io.WriteSeeker (and, through reader(), a
// ReadSeeker source) that does not allocate once its capacity suffices.
type memWS struct {
	b   []byte
	off int64
}

func (m *memWS) Write(p []byte) (int, error) {
	end := int(m.off) + len(p)
	if end > len(m.b) {
		if end > cap(m.b) {
			nb := make([]byte, len(m.b), 2*end)
			copy(nb, m.b)
			m.b = nb
		}
		m.b = m.b[:end]
	}
	copy(m.b[m.off:], p)
	m.off = int64(end)
	return len(p), nil
}

func (m *memWS) Seek(off int64, whence int) (int64, error) {
	switch whence {
	case io.SeekStart:
	case io.SeekCurrent:
		off += m.off
	case io.SeekEnd:
		off += int64(len(m.b))
	}
	if off < 0 {
		return 0, errors.New("negative seek")
	}
	m.off = off
	return off, nil
}

// failWS fails every Write after the first okWrites calls.
type failWS struct {
	memWS
	okWrites int
}

var errDiskFull = errors.New("simulated write failure")

func (f *failWS) Write(p []byte) (int, error) {
	if f.okWrites <= 0 {
		return 0, errDiskFull
	}
	f.okWrites--
	return f.memWS.Write(p)
}
