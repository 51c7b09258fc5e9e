package wavio

import "fmt"

// Format describes the sample layout of a WAVE stream.
type Format struct {
	SampleRate int  // frames per second, Hz
	Channels   int  // samples per frame, interleaved
	BitDepth   int  // bits per sample container: 8, 16, 24, 32 (PCM) or 32, 64 (float)
	Float      bool // IEEE 754 floating point rather than integer PCM
}

// Limits accepted by Reader and Writer. Whether a rate suits a particular
// render is the caller's decision; these only reject values that are almost
// certainly corrupt headers.
const (
	MinSampleRate = 8000
	MaxSampleRate = 384000
	MaxChannels   = 8
)

// Format tags (wFormatTag) as registered for RIFF/WAVE (values from
// memory for the ones only named in errors). Only PCM, IEEE float and EXTENSIBLE are decoded; the others are
// named only so that errors can say what was found.
const (
	tagPCM        = 0x0001
	tagADPCM      = 0x0002
	tagFloat      = 0x0003
	tagALaw       = 0x0006
	tagMuLaw      = 0x0007
	tagIMAADPCM   = 0x0011
	tagMPEG       = 0x0050
	tagMP3        = 0x0055
	tagExtensible = 0xFFFE
)

// guidTail is bytes 2..15 of KSDATAFORMAT_SUBTYPE_PCM and
// KSDATAFORMAT_SUBTYPE_IEEE_FLOAT as stored in a file
// ({0000000X-0000-0010-8000-00AA00389B71}, first three fields little-endian).
// The first two bytes hold the equivalent plain format tag.
var guidTail = [14]byte{0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xAA, 0x00, 0x38, 0x9B, 0x71}

func tagName(tag uint16) string {
	switch tag {
	case tagPCM:
		return "PCM"
	case tagADPCM:
		return "MS ADPCM"
	case tagFloat:
		return "IEEE float"
	case tagALaw:
		return "A-law"
	case tagMuLaw:
		return "mu-law"
	case tagIMAADPCM:
		return "IMA ADPCM"
	case tagMPEG, tagMP3:
		return "MPEG audio"
	case tagExtensible:
		return "EXTENSIBLE"
	}
	return fmt.Sprintf("0x%04X", tag)
}

// bytesPerSample returns the container size in bytes.
func (f Format) bytesPerSample() int { return f.BitDepth / 8 }

// blockAlign returns bytes per frame.
func (f Format) blockAlign() int { return f.Channels * f.bytesPerSample() }

// String formats f as, for example, "48000 Hz, 2 ch, 24-bit PCM".
func (f Format) String() string {
	kind := "PCM"
	if f.Float {
		kind = "float"
	}
	return fmt.Sprintf("%d Hz, %d ch, %d-bit %s", f.SampleRate, f.Channels, f.BitDepth, kind)
}

// checkEncoding reports whether the encoding part of f (bits and float
// flag) is one this package decodes.
func checkEncoding(f Format) error {
	if f.Float {
		if f.BitDepth != 32 && f.BitDepth != 64 {
			return fmt.Errorf("%d-bit IEEE float (want 32 or 64)", f.BitDepth)
		}
		return nil
	}
	switch f.BitDepth {
	case 8, 16, 24, 32:
		return nil
	}
	return fmt.Errorf("%d-bit PCM (want 8, 16, 24 or 32)", f.BitDepth)
}

// checkShape validates channel count and sample rate; chOff and rateOff
// are the byte offsets of those fields reported in the error (-1 when there
// is no stream).
func checkShape(f Format, chOff, rateOff int64) error {
	switch {
	case f.Channels <= 0:
		return fmtErr(chOff, ErrBadFormat, fmt.Sprintf("%d channels", f.Channels))
	case f.Channels > MaxChannels:
		return fmtErr(chOff, ErrUnsupported, fmt.Sprintf("%d channels (at most %d)", f.Channels, MaxChannels))
	case f.SampleRate <= 0:
		return fmtErr(rateOff, ErrBadFormat, fmt.Sprintf("sample rate %d Hz", f.SampleRate))
	case f.SampleRate < MinSampleRate || f.SampleRate > MaxSampleRate:
		return fmtErr(rateOff, ErrUnsupported, fmt.Sprintf("sample rate %d Hz (accepted %d to %d Hz)", f.SampleRate, MinSampleRate, MaxSampleRate))
	}
	return nil
}
