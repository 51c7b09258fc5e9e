package measure

import (
	"context"
	"errors"
	"runtime"
	"sync"
	"sync/atomic"

	"renderchain/chains"
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
}

type job struct {
	variant Variant
	amp     float64
	step    *float64
	set     string // the knob step's override
}

// Run carries out the plan. The measurements run in parallel on a bounded
// pool of workers; each builds its own circuit and solver, so results do
// not depend on scheduling. The first error, in plan order, is returned.
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
	results := make([]*Result, len(jobs))
	errs := make([]error, len(jobs))
	var done atomic.Int64
	var mu sync.Mutex
	err := parallel(ctx, len(jobs), p.Workers, func(ctx context.Context, i int) error {
		j := jobs[i]
		c, err := j.variant.Apply(ch)
		if err == nil && j.set != "" {
			err = c.Set(j.set)
		}
		var r *Result
		if err == nil {
			r, err = Sine(ctx, c, p.Freq, j.amp, opt)
		}
		if err != nil {
			errs[i] = err
			return err
		}
		r.Label = j.variant.Label
		r.Settings = append([]string(nil), j.variant.Sets...)
		if j.set != "" {
			r.Settings = append(r.Settings, j.set)
		}
		r.SweepValue = j.step
		results[i] = r
		if p.Progress != nil {
			n := int(done.Add(1))
			mu.Lock()
			p.Progress(n, len(jobs))
			mu.Unlock()
		}
		return nil
	})
	if err != nil {
		return nil, err // the caller's context ended
	}
	for _, e := range errs {
		// A job stopped because another failed reports the cancellation:
		// the failure itself comes first.
		if e != nil && !isCanceled(e) {
			return nil, e
		}
	}
	return &Report{Chain: ch.Name, ChainFile: ch.File, Sweep: p.Sweep, Measurements: results}, nil
}

// parallel runs f(0) … f(n−1) on at most workers goroutines (0:
// GOMAXPROCS). After a failure no new index is started and the others'
// context is cancelled; it returns the parent context's error if that
// ended, else nil (the caller reads the failures it recorded).
func parallel(parent context.Context, n, workers int, f func(ctx context.Context, i int) error) error {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, n)
	ctx, cancel := context.WithCancel(parent)
	defer cancel()
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := int(next.Add(1) - 1)
				if i >= n || ctx.Err() != nil {
					return
				}
				if err := f(ctx, i); err != nil {
					cancel()
					return
				}
			}
		}()
	}
	wg.Wait()
	return parent.Err()
}

func isCanceled(err error) bool { return errors.Is(err, context.Canceled) }
