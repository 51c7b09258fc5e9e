package render

import (
	"context"
	"fmt"
	"path/filepath"

	"renderchain/chains"
	"renderchain/dsp/synth"
	"renderchain/dsp/wavio"
	"renderchain/engine"
	"renderchain/outputs"
	"renderchain/parallel"
)

// DemoRate is the sample rate of the synthesized demo phrase.
const DemoRate = 48000

// DemoTake is one clip of the demo.
type DemoTake struct {
	Name, About string
	File        string  // file name inside the demo folder
	Report      *Report `json:"-"`
	ReportFile  string
}

// DemoSettings are the fuzz settings the demo renders, with the bypass.
var DemoSettings = []struct {
	Name string
	Fuzz float64
}{{"fuzz-low", 0.15}, {"fuzz-mid", 0.55}, {"fuzz-max", 1.0}}

// Demo synthesizes the dry phrase, renders it through chains/demo.toml at
// three fuzz settings and through the pickup and amplifier alone (the
// bypassed pedal), and writes the WAV files and JSON reports into dir, all
// of them or none: a one-folder outputs.Set, checked before any work,
// built in a hidden folder and moved in when complete (DemoInto). Renders
// run in parallel, at most workers at a time (0: one per core).
func Demo(ctx context.Context, dir string, workers int) ([]DemoTake, error) {
	set := outputs.New()
	d := set.Dir("output", dir)
	if err := set.Check(); err != nil {
		return nil, err
	}
	defer set.Abort()
	takes, err := DemoInto(ctx, d, workers)
	if err != nil {
		return nil, err
	}
	if err := set.Commit(); err != nil {
		return nil, err
	}
	return takes, nil
}

// DemoInto is Demo writing into d, a folder of an outputs.Set the caller
// has checked and commits (or aborts). The reports name the files where
// they will be after the commit, under d.Path().
func DemoInto(ctx context.Context, d *outputs.Dir, workers int) ([]DemoTake, error) {
	work := d.Work()
	phrase, err := synth.DemoPhrase(DemoRate, 1)
	if err != nil {
		return nil, err
	}
	dry := filepath.Join(work, "dry.wav")
	if err := wavio.WriteFile(dry, wavio.Format{SampleRate: DemoRate, Channels: 1, BitDepth: 24}, phrase); err != nil {
		return nil, err
	}
	base, err := chains.Example("demo")
	if err != nil {
		return nil, err
	}
	type job struct {
		take DemoTake
		ch   *chains.Chain
	}
	var jobs []job
	bypass := base.Clone()
	bypass.Name = base.Name + " (pedal bypassed: pickup and cable into the amplifier)"
	var keep []*chains.Stage
	for _, st := range bypass.Stages {
		if st.Environment {
			keep = append(keep, st)
		}
	}
	bypass.Stages = keep
	jobs = append(jobs, job{DemoTake{Name: "bypass", About: "pickup and cable straight into the amplifier input"}, bypass})
	for _, s := range DemoSettings {
		ch := base.Clone()
		if err := ch.Set(fmt.Sprintf("fuzz.fuzz=%g", s.Fuzz)); err != nil {
			return nil, err
		}
		jobs = append(jobs, job{DemoTake{Name: s.Name, About: fmt.Sprintf("chains/demo.toml with fuzz.fuzz = %.2f", s.Fuzz)}, ch})
	}
	err = parallel.For(ctx, len(jobs), workers, func(ctx context.Context, i int) error {
		j := &jobs[i]
		eng, err := engine.PrepareContext(ctx, j.ch, 0)
		if err != nil {
			return fmt.Errorf("demo %s: %w", j.take.Name, err)
		}
		j.take.File = j.take.Name + ".wav"
		// The takes share the pool: each renders on one core.
		rep, err := RenderFile(ctx, eng, dry, filepath.Join(work, j.take.File), FileOptions{Workers: 1})
		if err != nil {
			return fmt.Errorf("demo %s: %w", j.take.Name, err)
		}
		rep.Input.File = filepath.Join(d.Path(), "dry.wav")
		rep.Output.File = filepath.Join(d.Path(), j.take.File)
		j.take.Report = rep
		j.take.ReportFile = j.take.Name + ".json"
		if err := writeJSONFile(filepath.Join(work, j.take.ReportFile), rep); err != nil {
			return fmt.Errorf("demo %s: %w", j.take.Name, err)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	takes := []DemoTake{{Name: "dry", About: "the synthesized DI phrase (plucked strings, 10 s)", File: "dry.wav"}}
	for _, j := range jobs {
		takes = append(takes, j.take)
	}
	return takes, nil
}
