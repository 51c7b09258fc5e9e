package engine

import (
	"context"
	"errors"
	"fmt"
	"strconv"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/dsp/resample"
	"renderchain/models"
	"renderchain/report"
)

// DefaultOversample is the oversampling factor of the analyses (sine
// measurements, sweeps, trials, the symmetric-clip search) when neither
// the caller nor the chain file names one. A render of a file in that case
// chooses its own factor per chain and rate (ChooseOversample).
const DefaultOversample = 4

// Where a prepared chain's oversampling factor came from
// (Prepared.OversampleFrom, FactorChoice.From).
const (
	FactorRequested = "requested" // the caller's (a command's --oversample)
	FactorChain     = "chain"     // the chain's own oversample key (file or --set oversample=)
	FactorDefault   = "default"   // DefaultOversample
	FactorAuto      = "auto"      // chosen for the chain and rate (ChooseOversample)
)

// Base-rate limits of a channel: 8 kHz (the slowest analysis rate a bench
// measurement may ask for) to 192 kHz.
const (
	MinRate = 8000
	MaxRate = 192000
)

// MaxBlock is the largest block a Channel accepts per call.
const MaxBlock = 4096

// Oversample resolves the oversampling factor of a run: requested when it
// is not 0, else the chain's own setting, else DefaultOversample. It is
// the one place the default is chosen and the range (models.OversampleRange,
// at most resample.MaxFactor) is checked; a factor out of range is a
// *models.FieldError on the field "oversample".
func Oversample(ch *chains.Chain, requested int) (int, error) {
	n, _, err := oversampleFrom(ch, requested)
	return n, err
}

// oversampleFrom is Oversample, also saying where the factor came from
// (FactorRequested, FactorChain or FactorDefault).
func oversampleFrom(ch *chains.Chain, requested int) (int, string, error) {
	n, from := requested, FactorRequested
	if n == 0 && ch != nil {
		n, from = ch.Oversample, FactorChain
	}
	if n == 0 {
		n, from = DefaultOversample, FactorDefault
	}
	if err := models.OversampleRange.Check(float64(n)); err != nil || n > resample.MaxFactor {
		return 0, "", models.Fieldf("oversample", strconv.Itoa(n), "outside 1…%d", min(int(models.OversampleRange.Hi), resample.MaxFactor))
	}
	return n, from, nil
}

// Prepared is a chain ready to run: flattened to one circuit, its DC
// operating point solved, its stability checked, its oversampling factor
// resolved.
type Prepared struct {
	Chain      *chains.Chain
	Circuit    *models.Circuit
	DC         *mna.OperatingPoint
	Wiring     *chains.Wiring
	Oversample int
	// OversampleFrom says where Oversample came from: FactorRequested,
	// FactorChain or FactorDefault. Only a default factor gives way to a
	// render's automatic choice (ChooseOversample).
	OversampleFrom string
	// Findings are the chain's lint findings: the wiring's (Flatten) and
	// the operating point's (CheckOperatingPoint).
	Findings chains.Findings
	// Stability holds the poles of the circuit linearised at DC (nil when
	// the analysis could not run, which Warnings then says).
	Stability *mna.Stability
	// Warnings are what every report on this chain carries, in order: the
	// lint findings' warnings and the stability check's
	// (StabilityWarning). Never nil.
	Warnings report.Warnings

	idle idleCache
}

// Prepare flattens and lints the chain (chains.Chain.Flatten), solves its
// operating point, lints that (chains.Flat.CheckOperatingPoint), checks
// its stability and resolves the oversampling factor (see Oversample; 0
// takes the chain's or the default).
func Prepare(ch *chains.Chain, oversample int) (*Prepared, error) {
	return PrepareContext(context.Background(), ch, oversample)
}

// PrepareContext is Prepare that stops when ctx is done: the chain's size
// is checked before anything is built (chains.Chain.Flatten), and the DC
// solve checks ctx at every Newton iteration (mna.SolveDCContext). A
// stopped preparation returns an error wrapping ErrInterrupted and the
// context's cause.
func PrepareContext(ctx context.Context, ch *chains.Chain, oversample int) (*Prepared, error) {
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("%w (%w)", ErrInterrupted, context.Cause(ctx))
	}
	os, from, err := oversampleFrom(ch, oversample)
	if err != nil {
		return nil, err
	}
	flat, err := ch.Flatten()
	if err != nil {
		return nil, err
	}
	c := flat.Circuit
	op, err := mna.SolveDCContext(ctx, c, mna.DCOptions{})
	var ce *mna.CancelError
	if errors.As(err, &ce) {
		return nil, fmt.Errorf("%w (%w)", ErrInterrupted, ce.Cause)
	}
	if err != nil {
		return nil, fmt.Errorf("%s: at %s, %.1f °C: %w", ch.File, models.FormatValue(ch.Supply, "V"), ch.Temperature-models.ZeroCelsius, err)
	}
	flat.CheckOperatingPoint(op)
	p := &Prepared{Chain: ch, Circuit: c, DC: op, Wiring: flat.Wiring, Oversample: os, OversampleFrom: from,
		Findings: flat.Findings, Warnings: report.Warnings{}}
	p.Warnings.Merge(flat.Findings.Warnings())
	p.checkStability()
	return p, nil
}

// Node resolves a node name as a user writes it (chains.Wiring.Resolve):
// "" and "out" are the output.
func (p *Prepared) Node(name string) (int, error) { return p.Wiring.Resolve(p.Circuit, name) }

// NodeName is the name a report uses for node n.
func (p *Prepared) NodeName(n int) string { return chains.NodeName(p.Circuit, n) }
