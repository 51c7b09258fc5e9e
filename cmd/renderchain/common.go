package main

import (
	"encoding/json"
	"fmt"
	"os"
	"strings"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/urfave/cli/v2"
	"golang.org/x/term"

	"renderchain/chains"
)

// Flags shared by several commands, defined once.
var (
	chainFlag = &cli.StringFlag{Name: "chain", Aliases: []string{"c"}, Usage: "chain file (TOML), required"}
	setFlag   = &cli.StringSliceFlag{Name: "set", Usage: "override `KEY=VALUE`: stage.knob=0.3, stage.REF=22n, stage.REF.hfe=120, supply=8.5V, temperature=10C, input.peak=500mV (repeatable)"}
	quietFlag = &cli.BoolFlag{Name: "quiet", Aliases: []string{"q"}, Usage: "no summary or progress on stderr"}
	jsonFlag  = &cli.BoolFlag{Name: "json", Usage: "print JSON instead of a table"}
)

// parseFlag reads a flag's value with one of the models parsers; a value
// that does not parse or is out of range is a usage error naming the flag.
func parseFlag(c *cli.Context, name string, parse func(string) (float64, error)) (float64, error) {
	v, err := parse(c.String(name))
	if err != nil {
		return 0, badFlag(name, c.String(name), err)
	}
	return v, nil
}

// parseListFlag is parseFlag for a comma list (a repeatable flag's values
// are joined with commas).
func parseListFlag(c *cli.Context, name string, parse func(string) ([]float64, error)) ([]float64, error) {
	text := strings.Join(c.StringSlice(name), ",")
	if !c.IsSet(name) {
		return nil, nil
	}
	if fl, ok := flagValue(c, name); ok {
		text = fl
	}
	v, err := parse(text)
	if err != nil {
		return nil, badFlag(name, text, err)
	}
	return v, nil
}

// flagValue returns a string flag's value (for flags that are not slices).
func flagValue(c *cli.Context, name string) (string, bool) {
	for _, f := range c.Command.Flags {
		if sf, ok := f.(*cli.StringFlag); ok && sf.Name == name {
			return c.String(name), true
		}
	}
	return "", false
}

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
