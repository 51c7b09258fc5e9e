package report

import "renderchain/dsp/wavio"

// WAV describes a WAV file a command read or wrote.
type WAV struct {
	File       string  `json:"file"`
	Format     string  `json:"format"` // e.g. "PCM 24-bit"
	SampleRate int     `json:"sample_rate"`
	Channels   int     `json:"channels"`
	Frames     int64   `json:"frames"`
	Seconds    float64 `json:"seconds"`
}

// WAVOf describes the file at path in format f holding frames frames.
func WAVOf(path string, f wavio.Format, frames int64) WAV {
	w := WAV{File: path, Format: f.String(), SampleRate: f.SampleRate, Channels: f.Channels, Frames: frames}
	if f.SampleRate > 0 {
		w.Seconds = float64(frames) / float64(f.SampleRate)
	}
	return w
}
