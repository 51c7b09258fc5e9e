package measure

import (
	"context"
	"math"
	"math/cmplx"
	"strings"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/engine"
	"renderchain/models"
	"renderchain/report"
)

// Point is one frequency of a response curve.
type Point struct {
	Hz  float64       `json:"hz"`
	DB  report.Level  `json:"db"`  // 20·log10|H|
	Deg report.Number `json:"deg"` // arg H in degrees, (−180, 180]
	// DBc, on a harmonic curve of a swept measurement, is the harmonic's
	// level relative to the linear response at the same excitation
	// frequency.
	DBc *report.Level `json:"dbc,omitempty"`
}

// Curve is one labelled response.
type Curve struct {
	Label    string   `json:"label"`
	Settings []string `json:"settings,omitempty"`
	// Harmonic is set on swept curves: 1 for the linear response, h for
	// the h-th harmonic response (plotted against the excitation
	// frequency).
	Harmonic int `json:"harmonic,omitempty"`
	// ResolutionHz is the frequency resolution of a swept curve, the
	// reciprocal of its time window.
	ResolutionHz float64 `json:"resolution_hz,omitempty"`
	Points       []Point `json:"points"`
	// Warnings are those of the variant's prepared chain (build, stability
	// and its rendered check, operating point; bias.Warnings).
	Warnings report.Warnings `json:"warnings"`
}

// ResponseOptions configure a response measurement.
type ResponseOptions struct {
	// Probe is the node measured (default the chain's output); Ref, if
	// set, a node the response is taken relative to instead of the source
	// EMF.
	Probe, Ref string
	// SampleRate and Oversample give the internal rate whose Nyquist
	// limit bounds the frequencies (defaults 48 kHz and the chain's own
	// oversampling, else engine.DefaultOversample).
	SampleRate float64
	Oversample int
}

// ResponseReport is the outcome of RunResponse or RunSwept. The JSON names
// curves[].points[].hz, .db and .deg are part of the project's stable
// interface.
type ResponseReport struct {
	Chain     string     `json:"chain"`
	ChainFile string     `json:"chain_file"`
	Mode      string     `json:"mode"` // "small-signal" or "swept"
	Probe     string     `json:"probe"`
	Reference string     `json:"reference"` // "source" (EMF) or a node name
	Swept     *SweptInfo `json:"swept,omitempty"`
	Curves    []Curve    `json:"curves"`
	// Warnings joins the curves' (report.Combine: one a curve alone has
	// names it).
	Warnings report.Warnings `json:"warnings"`
	// Knobs are the knob positions of the chain the variants start from
	// (Knobs), for the figure's title.
	Knobs []string `json:"-"`
}

// checkFreqs bounds every frequency to [MinFrequency, limit).
func checkFreqs(freqs []float64, limit float64, rateText string) error {
	if len(freqs) == 0 {
		return models.Fieldf("frequencies", "", "none given")
	}
	for _, f := range freqs {
		fv := models.FormatValue(f, "Hz")
		if math.IsNaN(f) || f < MinFrequency {
			return models.Fieldf("frequency", fv, "is below the %g Hz limit", MinFrequency)
		}
		if f >= limit {
			return models.Fieldf("frequency", fv, "is at or above the Nyquist limit %s of the %s", models.FormatValue(limit, "Hz"), rateText)
		}
	}
	return nil
}

// SmallSignal returns the response of the chain at the given frequencies,
// linearised at its DC operating point (mna.AC: every device replaced by
// its small-signal conductances, capacitors and inductors by their
// admittances): from the source EMF (or opt.Ref) to opt.Probe.
func SmallSignal(ch *chains.Chain, freqs []float64, opt ResponseOptions) ([]Point, error) {
	pts, _, err := smallSignal(context.Background(), ch, freqs, opt)
	return pts, err
}

// smallSignal is SmallSignal, stopping when ctx is done (in the DC solve)
// and also returning the prepared chain.
func smallSignal(ctx context.Context, ch *chains.Chain, freqs []float64, opt ResponseOptions) ([]Point, *engine.Prepared, error) {
	if opt.SampleRate == 0 {
		opt.SampleRate = DefaultSampleRate
	}
	os, err := engine.Oversample(ch, opt.Oversample)
	if err != nil {
		return nil, nil, err
	}
	internal := opt.SampleRate * float64(os)
	if err := checkFreqs(freqs, internal/2, models.FormatValue(internal, "Hz")+" internal rate"); err != nil {
		return nil, nil, err
	}
	p, err := engine.PrepareContext(ctx, ch, os)
	if err != nil {
		return nil, nil, err
	}
	probe, err := probeNode(p, "probe", opt.Probe)
	if err != nil {
		return nil, nil, err
	}
	probes := []int{probe}
	if opt.Ref != "" {
		ref, err := probeNode(p, "ref", opt.Ref)
		if err != nil {
			return nil, nil, err
		}
		probes = append(probes, ref)
	}
	h, err := mna.AC(p.Circuit, p.DC, freqs, probes)
	if err != nil {
		return nil, nil, err
	}
	pts := make([]Point, len(freqs))
	for i, f := range freqs {
		v := h[i][0]
		if len(probes) > 1 {
			if h[i][1] == 0 {
				v = cmplx.NaN()
			} else {
				v /= h[i][1]
			}
		}
		pts[i] = point(f, v)
	}
	return pts, p, nil
}

func point(f float64, h complex128) Point {
	return Point{Hz: f, DB: report.Level(report.DB(cmplx.Abs(h))), Deg: report.Number(wrapDeg(cmplx.Phase(h) * 180 / math.Pi))}
}

// RunResponse computes the small-signal response of every variant of the
// chain (one curve each, labelled by the variant).
func RunResponse(ctx context.Context, ch *chains.Chain, variants []Variant, freqs []float64, opt ResponseOptions) (*ResponseReport, error) {
	if len(variants) == 0 {
		variants = []Variant{{}}
	}
	rep := &ResponseReport{Chain: ch.Name, ChainFile: ch.File, Mode: "small-signal", Probe: probeName(opt.Probe), Reference: refName(opt.Ref),
		Knobs: Knobs(ch)}
	for _, v := range variants {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		c, err := v.Apply(ch)
		if err != nil {
			return nil, err
		}
		pts, p, err := smallSignal(ctx, c, freqs, opt)
		if err != nil {
			return nil, err
		}
		w, err := bias.Warnings(ctx, p)
		if err != nil {
			return nil, err
		}
		rep.Curves = append(rep.Curves, Curve{Label: curveLabel(v), Settings: v.Sets, Points: pts, Warnings: w})
	}
	rep.Warnings = combineCurves(rep.Curves)
	return rep, nil
}

// curveLabel names a variant: its varying settings, else every override,
// else "as written" (the chain as the file has it).
func curveLabel(v Variant) string {
	switch {
	case v.Label != "":
		return v.Label
	case len(v.Sets) > 0:
		return strings.Join(v.Sets, " ")
	}
	return "as written"
}

func probeName(p string) string {
	if p == "" {
		return "out"
	}
	return p
}

func refName(r string) string {
	if r == "" {
		return "source"
	}
	return r
}

// combineCurves joins the warnings of every curve (report.Combine, named
// by the curves' labels).
func combineCurves(curves []Curve) report.Warnings {
	labels := make([]string, len(curves))
	lists := make([]report.Warnings, len(curves))
	for i, c := range curves {
		labels[i], lists[i] = c.Label, c.Warnings
	}
	return report.Combine(labels, lists)
}
