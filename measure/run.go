package measure

import (
	"context"
	"sync"
	"sync/atomic"

	"renderchain/chains"
	"renderchain/parallel"
	"renderchain/report"
)

// Plan is a set of sine measurements: every variant of the chain, at one
// frequency and amplitude, optionally swept over the source level or a
// knob.
type Plan struct {
	Variants  []Variant // nil: the chain as given
	Freq      float64   // Hz
	Amplitude float64   // volts peak at the source
	Sweep     *Sweep    // nil: one measurement per variant
	Options   Options
	// Workers bounds the measurements run at once; 0 is GOMAXPROCS.
	Workers int
	// Progress, if set, is called after each measurement with the count
	// done and the total (from the worker goroutines, one call at a time).
	Progress func(done, total int)
}

// Report is the outcome of a Plan: the measurements in order, variant by
// variant, each variant's sweep steps in order.
type Report struct {
	Chain        string    `json:"chain"`
	ChainFile    string    `json:"chain_file"`
	Sweep        *Sweep    `json:"sweep,omitempty"`
	Measurements []*Result `json:"measurements"`
	// Warnings joins the measurements' (report.Combine: one that only some
	// measurements have names them).
	Warnings report.Warnings `json:"warnings"`
	// Knobs are the knob positions of the chain the variants start from
	// (Knobs), for the figures' titles.
	Knobs []string `json:"-"`
}

type job struct {
	variant Variant
	amp     float64
	step    *float64
	set     string // the knob step's override
}

// Run carries out the plan. The measurements run in parallel on a bounded
// pool of workers (package parallel); each builds its own circuit and
// solver, so results do not depend on scheduling. The first error, in plan
// order, is returned.
func Run(ctx context.Context, ch *chains.Chain, p Plan) (*Report, error) {
	variants := p.Variants
	if len(variants) == 0 {
		variants = []Variant{{}}
	}
	opt := p.Options.withDefaults()
	if err := opt.check(); err != nil {
		return nil, err
	}
	if err := checkSignal(p.Freq, p.Amplitude, opt.SampleRate); err != nil {
		return nil, err
	}
	var jobs []job
	for _, v := range variants {
		// Check every override now, before any work starts.
		c, err := v.Apply(ch)
		if err != nil {
			return nil, err
		}
		if p.Sweep == nil {
			jobs = append(jobs, job{variant: v, amp: p.Amplitude})
			continue
		}
		for _, x := range p.Sweep.StepList {
			x := x
			j := job{variant: v, amp: p.Amplitude, step: &x}
			if p.Sweep.Kind == LevelSweep {
				j.amp = x
			} else {
				j.set = p.Sweep.knobSet(x)
				if err := c.Clone().Set(j.set); err != nil {
					return nil, err
				}
			}
			jobs = append(jobs, j)
		}
	}
	// The alias figures are jobs of their own on the same pool: one
	// render per measurement and factor.
	var ajobs []aliasJob
	if opt.Alias {
		for i, j := range jobs {
			fs, err := j.aliasFactors(ch, opt)
			if err != nil {
				return nil, err
			}
			for _, f := range fs {
				ajobs = append(ajobs, aliasJob{job: i, factor: f})
			}
		}
	}
	results := make([]*Result, len(jobs))
	aliases := make([]AliasFactor, len(ajobs))
	total := len(jobs) + len(ajobs)
	var done atomic.Int64
	var mu sync.Mutex
	err := parallel.For(ctx, total, p.Workers, func(ctx context.Context, i int) error {
		if i < len(jobs) {
			r, err := jobs[i].run(ctx, ch, p, opt)
			if err != nil {
				return err
			}
			results[i] = r
		} else {
			a := ajobs[i-len(jobs)]
			r, err := jobs[a.job].alias(ctx, ch, p.Freq, a.factor, opt)
			if err != nil {
				return err
			}
			aliases[i-len(jobs)] = r
		}
		if p.Progress != nil {
			n := int(done.Add(1))
			mu.Lock()
			p.Progress(n, total)
			mu.Unlock()
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	if opt.Alias {
		for i, j := range jobs {
			results[i].Alias = newAliasResult(p.Freq, j.amp, opt)
		}
		for k, a := range ajobs {
			r := results[a.job]
			r.Alias.Factors = append(r.Alias.Factors, aliases[k])
		}
		for _, r := range results {
			r.Warnings.Merge(r.Alias.warnings())
		}
	}
	rep := &Report{Chain: ch.Name, ChainFile: ch.File, Sweep: p.Sweep, Measurements: results, Knobs: Knobs(ch)}
	rep.Warnings = rep.combinedWarnings()
	return rep, nil
}

// run measures one job: the variant, the sweep step's override or level.
func (j job) run(ctx context.Context, ch *chains.Chain, p Plan, opt Options) (*Result, error) {
	c, err := j.chain(ch)
	if err != nil {
		return nil, err
	}
	r, err := Sine(ctx, c, p.Freq, j.amp, opt)
	if err != nil {
		return nil, err
	}
	r.Label = j.variant.Label
	r.Settings = append([]string(nil), j.variant.Sets...)
	if j.set != "" {
		r.Settings = append(r.Settings, j.set)
	}
	r.SweepValue = j.step
	return r, nil
}
