package abtest

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"

	"renderchain/dsp/loudness"
	"renderchain/dsp/spectrum"
	"renderchain/dsp/wavio"
)

// Levels are the loudness and peak levels of a clip.
type Levels struct {
	LUFS         DB `json:"lufs"`
	TruePeakDBTP DB `json:"true_peak_dbtp"`
	PeakDBFS     DB `json:"peak_dbfs"`
}

// FileReport is what AnalyzeFile measures. Levels are relative to digital
// full scale (±1): a full-scale sine has peak 0 dBFS and RMS −3.01 dBFS.
// A level that does not exist (silence, or a file too short for the
// window) is −∞ or NaN inside and null in JSON; Notes says why.
type FileReport struct {
	File       string  `json:"file"`
	Format     string  `json:"format"`
	SampleRate int     `json:"sample_rate"`
	Channels   int     `json:"channels"`
	Frames     int64   `json:"frames"`
	Seconds    float64 `json:"seconds"`

	PeakDBFS DB      `json:"peak_dbfs"` // largest |sample| over all channels
	RMSDBFS  DB      `json:"rms_dbfs"`  // over all samples of all channels
	CrestDB  DB      `json:"crest_db"`  // peak/RMS
	DCOffset float64 `json:"dc_offset"` // mean of all samples, full-scale units
	// NearFullScale counts samples with |x| ≥ 1 − 2⁻¹⁵ (within one 16-bit
	// step of full scale): a sign of clipping upstream.
	NearFullScale int64 `json:"near_full_scale_samples"`

	LUFS             DB `json:"lufs"`                // integrated, ITU-R BS.1770-4
	TruePeakDBTP     DB `json:"true_peak_dbtp"`      // BS.1770-4 Annex 2
	LoudnessRangeLU  DB `json:"loudness_range_lu"`   // EBU Tech 3342
	MomentaryMaxLUFS DB `json:"momentary_max_lufs"`  // 400 ms window
	ShortTermMaxLUFS DB `json:"short_term_max_lufs"` // 3 s window

	CentroidHz DB          `json:"spectral_centroid_hz"`
	Bands      []BandLevel `json:"third_octaves"`

	Notes []string `json:"notes"`
}

// BandLevel is one one-third-octave band of the long-term average spectrum,
// in dB relative to a full-scale sine.
type BandLevel struct {
	Hz       float64 `json:"hz"`        // IEC 61260-1 nominal midband frequency
	CentreHz float64 `json:"centre_hz"` // exact midband frequency
	DB       DB      `json:"db"`
}

// nearFullScale is the magnitude from which a sample counts as at full scale.
const nearFullScale = 1 - 1.0/32768

// AnalyzeFile measures a WAV file in one streaming pass with memory that
// does not grow with the file, apart from the loudness meter's 8 bytes per
// 100 ms (see package loudness). The spectrum (Welch average, frames of about
// half a second) and its centroid are those of the channels' mean. Loudness
// uses the BS.1770-4 channel weight 1.0 for every channel: right for mono and
// stereo; surround layouts are not recognised.
func AnalyzeFile(ctx context.Context, path string) (*FileReport, error) {
	f, err := wavio.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	fm := f.Format()
	nc := fm.Channels
	fs := float64(fm.SampleRate)
	meter, err := newMeter(fs, nc)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	ltas, err := spectrum.NewLTAS(fs, 0)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	const block = 4096
	buf := make([]float64, block*nc)
	mono := make([]float64, block)
	var peak, sum, sumSq float64
	var n, near int64
	for {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		k, rerr := f.Read(buf)
		if k > 0 {
			x := buf[:k]
			meter.Write(x)
			for _, v := range x {
				a := math.Abs(v)
				if a > peak {
					peak = a
				}
				if a >= nearFullScale {
					near++
				}
				sum += v
				sumSq += v * v
			}
			n += int64(k)
			frames := k / nc
			if nc == 1 {
				copy(mono, x)
			} else {
				for i := 0; i < frames; i++ {
					s := 0.0
					for c := 0; c < nc; c++ {
						s += x[i*nc+c]
					}
					mono[i] = s / float64(nc)
				}
			}
			if err := ltas.Write(mono[:frames]); err != nil {
				return nil, fmt.Errorf("%s: %w", path, err)
			}
		}
		if rerr == io.EOF {
			break
		}
		if rerr != nil {
			return nil, rerr
		}
	}
	r := &FileReport{
		File: path, Format: fm.String(), SampleRate: fm.SampleRate, Channels: nc,
		Frames: f.Frames(), Seconds: float64(f.Frames()) / fs,
		PeakDBFS: DB(dbOf(peak)), NearFullScale: near,
		LUFS: DB(meter.Integrated()), TruePeakDBTP: DB(meter.TruePeak()),
		MomentaryMaxLUFS: DB(meter.MomentaryMax()), ShortTermMaxLUFS: DB(meter.ShortTermMax()),
		LoudnessRangeLU: DB(meter.LoudnessRange()), CentroidHz: DB(ltas.Centroid()),
		Notes: []string{},
	}
	rms := 0.0
	if n > 0 {
		rms = math.Sqrt(sumSq / float64(n))
		r.DCOffset = sum / float64(n)
	}
	r.RMSDBFS = DB(dbOf(rms))
	r.CrestDB = DB(float64(r.PeakDBFS) - float64(r.RMSDBFS))
	if peak == 0 {
		r.CrestDB = DB(math.NaN())
		r.Notes = append(r.Notes, "the file is silent: peak, RMS, crest, loudness and centroid are null")
	} else {
		if r.Seconds < 0.4 {
			r.Notes = append(r.Notes, "shorter than 400 ms: integrated and momentary loudness are null")
		} else if !finite(float64(r.LUFS)) {
			r.Notes = append(r.Notes, "no 400 ms block above the −70 LUFS gate: integrated loudness is null")
		}
		switch {
		case r.Seconds < 3:
			r.ShortTermMaxLUFS = DB(math.Inf(-1))
			r.LoudnessRangeLU = DB(math.NaN())
			r.Notes = append(r.Notes, "shorter than 3 s: short-term maximum and loudness range are null")
		case r.Seconds < 3.1:
			r.LoudnessRangeLU = DB(math.NaN())
			r.Notes = append(r.Notes, "shorter than 3.1 s (two 3 s windows): loudness range is null")
		}
		if ltas.Frames() == 0 {
			r.Notes = append(r.Notes, fmt.Sprintf("shorter than one %d-sample spectrum frame: centroid and bands are null", ltas.FrameLen()))
		}
	}
	for _, b := range ltas.Bands() {
		r.Bands = append(r.Bands, BandLevel{Hz: b.Nominal, CentreHz: math.Round(b.Centre*1000) / 1000, DB: DB(b.Level)})
	}
	if err := meter.Err(); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return r, nil
}

// measureFile returns the loudness, true peak and loudness range of a file.
func measureFile(path string) (Levels, float64, error) {
	f, err := wavio.Open(path)
	if err != nil {
		return Levels{}, 0, err
	}
	defer f.Close()
	nc := f.Format().Channels
	m, err := newMeter(float64(f.Format().SampleRate), nc)
	if err != nil {
		return Levels{}, 0, err
	}
	buf := make([]float64, 4096*nc)
	for {
		k, rerr := f.Read(buf)
		m.Write(buf[:k])
		if errors.Is(rerr, io.EOF) {
			break
		}
		if rerr != nil {
			return Levels{}, 0, rerr
		}
	}
	return levelsOf(m), m.LoudnessRange(), nil
}

func newMeter(fs float64, nc int) (*loudness.Meter, error) {
	w := make([]float64, nc)
	for i := range w {
		w[i] = 1
	}
	return loudness.NewMeterWeights(fs, w)
}

func levelsOf(m *loudness.Meter) Levels {
	return Levels{LUFS: DB(m.Integrated()), TruePeakDBTP: DB(m.TruePeak()), PeakDBFS: DB(m.SamplePeak())}
}

// base returns the file name of a path, for messages.
func base(p string) string { return filepath.Base(p) }
