package analyze

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"

	"renderchain/dsp/loudness"
	"renderchain/dsp/spectrum"
	"renderchain/dsp/wavio"
	"renderchain/report"
)

// Levels are the loudness and peak levels of a clip.
type Levels struct {
	LUFS         report.Level `json:"lufs"`
	TruePeakDBTP report.Level `json:"true_peak_dbtp"`
	PeakDBFS     report.Level `json:"peak_dbfs"`
}

// Report is what File measures.
type Report struct {
	report.WAV

	PeakDBFS report.Level `json:"peak_dbfs"` // largest |sample| over all channels
	RMSDBFS  report.Level `json:"rms_dbfs"`  // over all samples of all channels
	CrestDB  report.Level `json:"crest_db"`  // peak/RMS
	DCOffset float64      `json:"dc_offset"` // mean of all samples, full-scale units
	// NearFullScale counts samples with |x| ≥ 1 − 2⁻¹⁵ (within one 16-bit
	// step of full scale): a sign of clipping upstream.
	NearFullScale int64 `json:"near_full_scale_samples"`

	LUFS             report.Level `json:"lufs"`                // integrated, ITU-R BS.1770-4
	TruePeakDBTP     report.Level `json:"true_peak_dbtp"`      // BS.1770-4 Annex 2
	LoudnessRangeLU  report.Level `json:"loudness_range_lu"`   // EBU Tech 3342
	MomentaryMaxLUFS report.Level `json:"momentary_max_lufs"`  // 400 ms window
	ShortTermMaxLUFS report.Level `json:"short_term_max_lufs"` // 3 s window

	CentroidHz report.Number `json:"spectral_centroid_hz"`
	Bands      []BandLevel   `json:"third_octaves"`

	Notes []string `json:"notes"`
}

// BandLevel is one one-third-octave band of the long-term average spectrum,
// in dB relative to a full-scale sine.
type BandLevel struct {
	Hz       float64      `json:"hz"`        // IEC 61260-1 nominal midband frequency
	CentreHz float64      `json:"centre_hz"` // exact midband frequency
	DB       report.Level `json:"db"`
}

// nearFullScale is the magnitude from which a sample counts as at full scale.
const nearFullScale = 1 - 1.0/32768

// File measures a WAV file in one streaming pass with memory that does
// not grow with the file, apart from the loudness meter's 8 bytes per
// 100 ms (see package loudness). The spectrum (Welch average, frames of
// about half a second) and its centroid are those of the channels' mean.
func File(ctx context.Context, path string) (*Report, error) {
	f, err := wavio.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	fm := f.Format()
	nc := fm.Channels
	fs := float64(fm.SampleRate)
	meter, err := NewMeter(fs, nc)
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
	levels := report.PeakRMS{Threshold: nearFullScale}
	for {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		k, rerr := f.Read(buf)
		if k > 0 {
			x := buf[:k]
			meter.Write(x)
			levels.Add(x)
			frames := k / nc
			downmix(mono[:frames], x, nc)
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
	if err := meter.Err(); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	r := &Report{
		WAV:      report.WAVOf(path, fm, f.Frames()),
		PeakDBFS: report.Level(report.DB(levels.Peak())), RMSDBFS: report.Level(report.DB(levels.RMS())),
		CrestDB: report.Level(levels.CrestDB()), DCOffset: levels.Mean(), NearFullScale: levels.Over(),
		LUFS: report.Level(meter.Integrated()), TruePeakDBTP: report.Level(meter.TruePeak()),
		MomentaryMaxLUFS: report.Level(meter.MomentaryMax()), ShortTermMaxLUFS: report.Level(meter.ShortTermMax()),
		LoudnessRangeLU: report.Level(meter.LoudnessRange()), CentroidHz: report.Number(ltas.Centroid()),
		Notes: []string{},
	}
	r.explain(levels.Peak(), ltas)
	r.Notes = append(r.Notes, report.InputNotes(path, f.Overs(), f.Warnings())...)
	for _, b := range ltas.Bands() {
		r.Bands = append(r.Bands, BandLevel{Hz: b.Nominal, CentreHz: math.Round(b.Centre*1000) / 1000, DB: report.Level(b.Level)})
	}
	return r, nil
}

// downmix writes the mean of the nc interleaved channels of x into mono.
func downmix(mono, x []float64, nc int) {
	if nc == 1 {
		copy(mono, x)
		return
	}
	for i := range mono {
		s := 0.0
		for c := 0; c < nc; c++ {
			s += x[i*nc+c]
		}
		mono[i] = s / float64(nc)
	}
}

// explain says in Notes which levels do not exist and why, and makes the
// ones a short file cannot have null.
func (r *Report) explain(peak float64, ltas *spectrum.LTAS) {
	if peak == 0 {
		r.Notes = append(r.Notes, "the file is silent: peak, RMS, crest, loudness and centroid are null")
		return
	}
	if r.Seconds < 0.4 {
		r.Notes = append(r.Notes, "shorter than 400 ms: integrated and momentary loudness are null")
	} else if !report.Finite(float64(r.LUFS)) {
		r.Notes = append(r.Notes, "no 400 ms block above the −70 LUFS gate: integrated loudness is null")
	}
	switch {
	case r.Seconds < 3:
		r.ShortTermMaxLUFS = report.Level(math.Inf(-1))
		r.LoudnessRangeLU = report.Level(math.NaN())
		r.Notes = append(r.Notes, "shorter than 3 s: short-term maximum and loudness range are null")
	case r.Seconds < 3.1:
		r.LoudnessRangeLU = report.Level(math.NaN())
		r.Notes = append(r.Notes, "shorter than 3.1 s (two 3 s windows): loudness range is null")
	}
	if ltas.Frames() == 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("shorter than one %d-sample spectrum frame: centroid and bands are null", ltas.FrameLen()))
	}
}

// Loudness returns the loudness, true peak and loudness range of a file.
func Loudness(path string) (Levels, float64, error) {
	f, err := wavio.Open(path)
	if err != nil {
		return Levels{}, 0, err
	}
	defer f.Close()
	nc := f.Format().Channels
	m, err := NewMeter(float64(f.Format().SampleRate), nc)
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
	return LevelsOf(m), m.LoudnessRange(), nil
}

// NewMeter returns a BS.1770-4 loudness meter for nc channels at fs, each
// channel weighted 1.0.
func NewMeter(fs float64, nc int) (*loudness.Meter, error) {
	w := make([]float64, nc)
	for i := range w {
		w[i] = 1
	}
	return loudness.NewMeterWeights(fs, w)
}

// LevelsOf reads a meter's loudness, true peak and sample peak.
func LevelsOf(m *loudness.Meter) Levels {
	return Levels{LUFS: report.Level(m.Integrated()), TruePeakDBTP: report.Level(m.TruePeak()), PeakDBFS: report.Level(m.SamplePeak())}
}
