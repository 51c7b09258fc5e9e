package main

import (
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"text/tabwriter"
	"time"

	"github.com/urfave/cli/v2"

	"renderchain/render"
)

func demoCommand() *cli.Command {
	return &cli.Command{
		Name:      "demo",
		Usage:     "synthesize a dry phrase and render it through chains/demo.toml at three fuzz settings and bypassed",
		UsageText: "renderchain demo [--outdir DIR] [--force]",
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "outdir", Value: "demo-out", Usage: "folder for the WAV files and reports"},
			&cli.BoolFlag{Name: "force", Usage: "write into a folder that already holds files"},
			quietFlag,
		},
		Action: func(c *cli.Context) error {
			if c.NArg() > 0 {
				return usagef("demo takes no arguments (got %q)", c.Args().First())
			}
			dir := c.String("outdir")
			if entries, err := os.ReadDir(dir); err == nil && len(entries) > 0 && !c.Bool("force") {
				return usagef("--outdir %s is not empty: add --force to write into it", dir)
			}
			set := newOutputs(c)
			out := set.Dir("outdir", dir)
			if err := set.Check(); err != nil { // before any work
				return err
			}
			defer set.Abort()
			start := time.Now()
			takes, err := render.DemoInto(c.Context, out, runtime.NumCPU())
			if err != nil {
				return err
			}
			if err := commitOutputs(c, set); err != nil {
				return err
			}
			if c.Bool("quiet") {
				return nil
			}
			w := tabwriter.NewWriter(c.App.Writer, 2, 4, 2, ' ', 0)
			fmt.Fprintf(w, "clip\tpeak dBFS\tRMS dBFS\tcrest dB\tcentroid Hz\tNewton mean/max\trealtime\t\n")
			for _, t := range takes {
				if t.Report == nil {
					fmt.Fprintf(w, "%s\t\t\t\t\t\t\t%s\n", t.File, t.About)
					continue
				}
				r := t.Report
				fmt.Fprintf(w, "%s\t%.1f\t%.1f\t%.1f\t%.0f\t%.2f/%d\t%.1fx\t%s\n", t.File, float64(r.Output.PeakDBFS), float64(r.Output.RMSDBFS),
					float64(r.Output.CrestDB), r.Output.CentroidHz, r.Solver.MeanIterations, r.Solver.MaxIterations, r.RealtimeFactor, t.About)
			}
			w.Flush()
			abs, _ := filepath.Abs(dir)
			fmt.Fprintf(c.App.Writer, "\nWrote %d WAV files and their JSON reports to %s in %.1f s.\n", len(takes), abs, time.Since(start).Seconds())
			fmt.Fprintln(c.App.Writer, hearingCaution)
			return nil
		},
	}
}
