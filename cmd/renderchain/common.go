package main

import (
	"encoding/json"
	"fmt"
	"os"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/urfave/cli/v2"
	"golang.org/x/term"

	"renderchain/chains"
	"renderchain/dsp/wavio"
)

// Flags shared by several commands, defined once.
var (
	chainFlag = &cli.StringFlag{Name: "chain", Aliases: []string{"c"}, Usage: "chain file (TOML)", Required: true}
	setFlag   = &cli.StringSliceFlag{Name: "set", Usage: "override `KEY=VALUE`: stage.knob=0.3, stage.REF=22n, stage.REF.hfe=120, supply=8.5V, temperature=10C, input.peak=500mV (repeatable)"}
	quietFlag = &cli.BoolFlag{Name: "quiet", Aliases: []string{"q"}, Usage: "no summary or progress on stderr"}
	jsonFlag  = &cli.BoolFlag{Name: "json", Usage: "print JSON instead of a table"}
)

// loadChain reads the chain file and applies the --set overrides.
func loadChain(c *cli.Context) (*chains.Chain, error) {
	ch, err := chains.Load(c.String("chain"))
	if err != nil {
		return nil, err
	}
	for _, kv := range c.StringSlice("set") {
		if err := ch.Set(kv); err != nil {
			return nil, err
		}
	}
	return ch, nil
}

// writeJSON writes v as indented JSON to path atomically (temp + rename).
func writeJSON(path string, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	return writeFileAtomic(path, append(b, '\n'))
}

func writeFileAtomic(path string, b []byte) error { return wavio.WriteFileAtomic(path, b) }

func printJSON(c *cli.Context, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	_, err = fmt.Fprintln(c.App.Writer, string(b))
	return err
}

// progress returns a callback that shows a bar on stderr once a job has run
// for two seconds, if stderr is a terminal and not quiet; and a func that
// closes the bar.
func progress(quiet bool, label string) (func(done, total int64), func()) {
	if quiet || !term.IsTerminal(int(os.Stderr.Fd())) {
		return nil, func() {}
	}
	start := time.Now()
	var bar *progressbar.ProgressBar
	update := func(done, total int64) {
		if bar == nil {
			if time.Since(start) < 2*time.Second || done >= total {
				return
			}
			bar = progressbar.NewOptions64(total, progressbar.OptionSetWriter(os.Stderr),
				progressbar.OptionSetDescription(label), progressbar.OptionSetPredictTime(true),
				progressbar.OptionThrottle(100*time.Millisecond), progressbar.OptionClearOnFinish())
		}
		bar.Set64(done)
	}
	return update, func() {
		if bar != nil {
			bar.Finish()
		}
	}
}

const hearingCaution = "Fuzz renders are loud and dense: set playback low before pressing play, then raise it."
