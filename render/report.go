package render

import (
	"encoding/json"
	"fmt"
	"math"
	"time"

	"renderchain/dsp/wavio"
	"renderchain/dsp/wdf"
	"renderchain/engine"
	"renderchain/models"
	"renderchain/report"
)

// Report describes a finished render. Its JSON field names are part of the
// project's stable interface.
type Report struct {
	Chain          string          `json:"chain"`
	ChainFile      string          `json:"chain_file"`
	SupplyV        float64         `json:"supply_v"`
	TemperatureC   float64         `json:"temperature_c"`
	Input          SignalReport    `json:"input"`
	Output         SignalReport    `json:"output"`
	Solver         SolverReport    `json:"solver"`
	RealtimeFactor float64         `json:"realtime_factor"`
	ElapsedSeconds float64         `json:"elapsed_s"`
	Spectrum       []BandReport    `json:"third_octaves"`
	Warnings       report.Warnings `json:"warnings"`

	dry, wet          *levels
	inPeak, fullScale float64
}

// SignalReport gives the levels of the dry input or the wet output, in dB
// relative to digital full scale (a full-scale sine has RMS −3.01 dBFS).
type SignalReport struct {
	report.WAV
	PeakDBFS       report.Level  `json:"peak_dbfs"`
	RMSDBFS        report.Level  `json:"rms_dbfs"`
	CrestDB        report.Level  `json:"crest_db"`
	ClippedSamples int64         `json:"clipped_samples"`
	PeakVolts      float64       `json:"peak_volts"`
	CentroidHz     report.Number `json:"centroid_hz"` // null for silence
}

// BandReport is one third-octave band (IEC 61260-1 nominal centre) of the
// long-term average spectrum of dry and wet, dB re a full-scale sine. For
// stereo, the spectrum is that of the channels' mean.
type BandReport struct {
	Hz    float64      `json:"hz"`
	DryDB report.Level `json:"dry_db"`
	WetDB report.Level `json:"wet_db"`
}

// SolverReport gives the Newton statistics over all channels and how the
// circuit was set up.
type SolverReport struct {
	Oversample   int     `json:"oversample"`
	InternalRate float64 `json:"internal_rate_hz"`
	// OversampleFrom is where the factor came from: "requested" (the
	// command line), "chain" (the chain's oversample setting) or "auto"
	// (chosen for this chain and rate, engine.ChooseOversample), and
	// OversampleReason says why in a sentence.
	OversampleFrom   string `json:"oversample_from"`
	OversampleReason string `json:"oversample_reason"`
	// AliasProbe is the automatic choice's measurement (omitted for a
	// factor given or a circuit without devices).
	AliasProbe *AliasProbe `json:"alias_probe,omitempty"`
	// Segments is the number of pieces a mono render was cut into for
	// several cores (1: serial, SegmentNote saying why), each rendered
	// from WarmupS before its start.
	Segments    int     `json:"segments"`
	WarmupS     float64 `json:"segment_warmup_s"`
	SegmentNote string  `json:"segment_note,omitempty"`
	// JoinError is the largest difference, in full scale, between a
	// segment's warm-up and the previous segment's output where they
	// meet (engine.StreamInfo.JoinError; 0 for a serial render).
	JoinError float64 `json:"segment_join_error_fs"`
	report.Solver
	DCMethod       string `json:"dc_method"`
	DCIterations   int    `json:"dc_iterations"`
	States         int    `json:"reactive_states"`
	NonlinearPorts int    `json:"nonlinear_ports"`
}

// AliasProbe is what the automatic factor measured: the worst probe
// tone's signal-to-alias ratio at the factor chosen, the target, every
// factor tried, and the seconds the choice took.
type AliasProbe struct {
	SignalToAliasDB report.Level        `json:"signal_to_alias_db"`
	TargetDB        float64             `json:"target_db"`
	ProbeLevelFS    float64             `json:"probe_level_fs"`
	Trials          []engine.AliasTrial `json:"trials"`
	WarpFloor       int                 `json:"warp_floor"`
	Seconds         float64             `json:"seconds"`
}

// setFactor records the oversampling factor a render runs at.
func (r *Report) setFactor(c *engine.FactorChoice, fs float64, took time.Duration) {
	r.Solver.Oversample, r.Solver.InternalRate = c.Factor, fs*float64(c.Factor)
	r.Solver.OversampleFrom, r.Solver.OversampleReason = c.From, c.Reason
	if len(c.Trials) > 0 {
		r.Solver.AliasProbe = &AliasProbe{SignalToAliasDB: report.Level(c.AliasDB), TargetDB: engine.AliasTarget, ProbeLevelFS: engine.AliasProbeLevel,
			Trials: c.Trials, WarpFloor: c.WarpFloor, Seconds: math.Round(took.Seconds()*100) / 100}
	}
	if c.Warning != "" {
		r.Warnings.Add("%s", c.Warning)
	}
}

// setPlan records how the render was cut across cores, and warns when
// the segments did not join within engine.JoinTolerance.
func (r *Report) setPlan(st engine.StreamInfo) {
	p := st.Plan
	r.Solver.Segments, r.Solver.WarmupS, r.Solver.SegmentNote, r.Solver.JoinError = p.Segments, 0, "", st.JoinError
	if p.Segments > 1 {
		r.Solver.WarmupS = math.Round(p.WarmupSeconds*1000) / 1000
	} else {
		r.Solver.SegmentNote = p.Reason
	}
	if !(st.JoinError <= engine.JoinTolerance) {
		r.Warnings.Add("the render was cut into %d segments for several cores, and where they join the circuit still remembered its start "+
			"(%.2g of full scale, over %.2g): render with --workers 1 for the serial result", p.Segments, st.JoinError, engine.JoinTolerance)
	}
}

func newReport(p *engine.Prepared, in, out string, f, of wavio.Format, frames int64) *Report {
	ch := p.Chain
	return &Report{Chain: ch.Name, ChainFile: ch.File, SupplyV: ch.Supply, TemperatureC: ch.Temperature - models.ZeroCelsius,
		Input: SignalReport{WAV: report.WAVOf(in, f, frames)}, Output: SignalReport{WAV: report.WAVOf(out, of, frames)},
		Solver: SolverReport{Oversample: p.Oversample, InternalRate: float64(f.SampleRate * p.Oversample),
			DCMethod: p.DC.Method, DCIterations: p.DC.Iterations},
		Warnings: report.Warnings{}, dry: newLevels(float64(f.SampleRate), f.Channels), wet: newLevels(float64(f.SampleRate), f.Channels),
		inPeak: ch.InputPeak, fullScale: ch.FullScale}
}

func (s *SignalReport) fill(l *levels, voltsFS float64) {
	s.PeakDBFS = report.Level(report.DB(l.Peak()))
	s.RMSDBFS = report.Level(report.DB(l.RMS()))
	s.CrestDB = report.Level(l.CrestDB())
	s.PeakVolts = l.Peak() * voltsFS
	s.CentroidHz = report.Number(math.NaN())
	if l.ltas != nil && l.ltas.Frames() > 0 {
		s.CentroidHz = report.Number(math.Round(l.ltas.Centroid()*10) / 10)
	}
}

func (r *Report) finish(st wdf.Stats, clipped int64, elapsed time.Duration) {
	r.Input.fill(r.dry, r.inPeak)
	r.Output.fill(r.wet, r.fullScale)
	r.Output.ClippedSamples = clipped
	r.Input.ClippedSamples = r.dry.Over()
	if r.dry.ltas != nil && r.wet.ltas != nil && r.dry.ltas.Frames() > 0 {
		db, wb := r.dry.ltas.Bands(), r.wet.ltas.Bands()
		for i := range db {
			r.Spectrum = append(r.Spectrum, BandReport{Hz: db[i].Nominal, DryDB: report.Level(db[i].Level), WetDB: report.Level(wb[i].Level)})
		}
	}
	r.Solver.Solver = report.SolverOf(st)
	r.ElapsedSeconds = elapsed.Seconds()
	if elapsed > 0 {
		r.RealtimeFactor = math.Round(r.Input.Seconds/elapsed.Seconds()*100) / 100
	}
	if r.dry.N() > 0 && r.dry.Peak() == 0 {
		r.Warnings.Add("the input is silence: the device models make no noise (no thermal or shot noise), so the output holds only what the circuit "+
			"makes by itself (hum, oscillation, a start-up transient), not its hiss; here it peaks at %s", levelText(float64(r.Output.PeakDBFS), "dBFS"))
	}
	if clipped > 0 {
		r.Warnings.Add("%d output samples beyond full scale were clipped (peak %.2f dBFS): raise output.full_scale or lower the volume knob", clipped, float64(r.Output.PeakDBFS))
	}
	if st.NonConverged > 0 {
		r.Warnings.Add("%d samples did not converge to tolerance (kept finite); try a higher oversampling factor", st.NonConverged)
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

// levelText writes a level for a warning: "−∞ dBFS" reads as "nothing".
func levelText(db float64, unit string) string {
	if !report.Finite(db) {
		return "nothing (exact zeros)"
	}
	return fmt.Sprintf("%.1f %s", db, unit)
}
