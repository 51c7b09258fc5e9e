package render

import (
	"encoding/json"
	"fmt"
	"math"
	"time"

	"renderchain/dsp/wavio"
	"renderchain/dsp/wdf"
)

// Report describes a finished render. Its JSON field names are part of the
// project's stable interface.
type Report struct {
	Chain          string       `json:"chain"`
	ChainFile      string       `json:"chain_file"`
	Input          SignalReport `json:"input"`
	Output         SignalReport `json:"output"`
	Solver         SolverReport `json:"solver"`
	RealtimeFactor float64      `json:"realtime_factor"`
	ElapsedSeconds float64      `json:"elapsed_s"`
	Spectrum       []BandReport `json:"third_octaves"`
	Warnings       []string     `json:"warnings"`

	dry, wet          *levels
	inPeak, fullScale float64
}

// SignalReport gives the levels of the dry input or the wet output, in dB
// relative to digital full scale (a full-scale sine has RMS −3.01 dBFS).
type SignalReport struct {
	File           string  `json:"file"`
	Format         string  `json:"format"`
	SampleRate     int     `json:"sample_rate"`
	Channels       int     `json:"channels"`
	Frames         int64   `json:"frames"`
	Seconds        float64 `json:"seconds"`
	PeakDBFS       Decibel `json:"peak_dbfs"`
	RMSDBFS        Decibel `json:"rms_dbfs"`
	CrestDB        Decibel `json:"crest_db"`
	ClippedSamples int64   `json:"clipped_samples"`
	PeakVolts      float64 `json:"peak_volts"`
	CentroidHz     float64 `json:"centroid_hz"`
}

// BandReport is one third-octave band (IEC 61260-1 nominal centre) of the
// long-term average spectrum of dry and wet, dB re a full-scale sine. For
// stereo, the spectrum is that of the channels' mean.
type BandReport struct {
	Hz    float64 `json:"hz"`
	DryDB Decibel `json:"dry_db"`
	WetDB Decibel `json:"wet_db"`
}

// SolverReport gives the Newton statistics over all channels.
type SolverReport struct {
	Oversample     int     `json:"oversample"`
	InternalRate   float64 `json:"internal_rate_hz"`
	Samples        int64   `json:"samples"`
	MeanIterations float64 `json:"mean_iterations"`
	MaxIterations  int     `json:"max_iterations"`
	Fallbacks      int64   `json:"fallbacks"`
	NonConverged   int64   `json:"nonconverged"`
	DCMethod       string  `json:"dc_method"`
	DCIterations   int     `json:"dc_iterations"`
	States         int     `json:"reactive_states"`
	NonlinearPorts int     `json:"nonlinear_ports"`
}

// Decibel is a level that marshals −∞ (silence) as JSON null, since JSON
// has no infinities.
type Decibel float64

// MarshalJSON implements json.Marshaler.
func (d Decibel) MarshalJSON() ([]byte, error) {
	if math.IsInf(float64(d), 0) || math.IsNaN(float64(d)) {
		return []byte("null"), nil
	}
	return json.Marshal(math.Round(float64(d)*1000) / 1000)
}

func newReport(e *Engine, in, out string, f, of wavio.Format, frames int64) *Report {
	sr := func(file string, ff wavio.Format) SignalReport {
		return SignalReport{File: file, Format: ff.String(), SampleRate: ff.SampleRate, Channels: ff.Channels,
			Frames: frames, Seconds: float64(frames) / float64(ff.SampleRate)}
	}
	return &Report{Chain: e.Chain.Name, ChainFile: e.Chain.File, Input: sr(in, f), Output: sr(out, of),
		Solver: SolverReport{Oversample: e.Oversample, InternalRate: float64(f.SampleRate * e.Oversample),
			DCMethod: e.DC.Method, DCIterations: e.DC.Iterations},
		Warnings: []string{}, dry: newLevels(float64(f.SampleRate), f.Channels), wet: newLevels(float64(f.SampleRate), f.Channels), inPeak: e.Chain.InputPeak, fullScale: e.Chain.FullScale}
}

func (s *SignalReport) fill(l *levels, voltsFS float64) {
	s.PeakDBFS = Decibel(dbfs(l.peak))
	s.RMSDBFS = Decibel(dbfs(l.rms()))
	s.CrestDB = Decibel(dbfs(l.peak) - dbfs(l.rms()))
	if l.rms() == 0 {
		s.CrestDB = 0
	}
	s.PeakVolts = l.peak * voltsFS
	if l.ltas != nil && l.ltas.Frames() > 0 {
		s.CentroidHz = math.Round(l.ltas.Centroid()*10) / 10
	}
}

func (r *Report) finish(st wdf.Stats, clipped int64, elapsed time.Duration) {
	r.Input.fill(r.dry, r.inPeak)
	r.Output.fill(r.wet, r.fullScale)
	r.Output.ClippedSamples = clipped
	r.Input.ClippedSamples = r.dry.over
	if r.dry.ltas != nil && r.wet.ltas != nil && r.dry.ltas.Frames() > 0 {
		db, wb := r.dry.ltas.Bands(), r.wet.ltas.Bands()
		for i := range db {
			r.Spectrum = append(r.Spectrum, BandReport{Hz: db[i].Nominal, DryDB: Decibel(db[i].Level), WetDB: Decibel(wb[i].Level)})
		}
	}
	r.Solver.Samples = st.Samples
	r.Solver.MeanIterations = math.Round(st.MeanIterations()*1000) / 1000
	r.Solver.MaxIterations = st.MaxIterations
	r.Solver.Fallbacks = st.Fallbacks
	r.Solver.NonConverged = st.NonConverged
	r.ElapsedSeconds = elapsed.Seconds()
	if elapsed > 0 {
		r.RealtimeFactor = math.Round(r.Input.Seconds/elapsed.Seconds()*100) / 100
	}
	if clipped > 0 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("%d output samples beyond full scale were clipped (peak %.2f dBFS): raise output.full_scale or lower the volume knob", clipped, float64(r.Output.PeakDBFS)))
	}
	if st.NonConverged > 0 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("%d samples did not converge to tolerance (kept finite); try a higher --oversample", st.NonConverged))
	}
}

// writeJSONFile writes v as indented JSON to path, atomically.
func writeJSONFile(path string, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	return wavio.WriteFileAtomic(path, append(b, '\n'))
}
