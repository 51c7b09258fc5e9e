package main

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/urfave/cli/v2"

	"renderchain/analyze"
	"renderchain/report"
)

func analyzeCommand() *cli.Command {
	return &cli.Command{
		Name:      "analyze",
		Usage:     "levels, loudness and spectrum of a WAV file",
		UsageText: "renderchain analyze FILE.wav [--json]",
		Description: "Reads the file once, in constant memory, and reports peak and RMS level (dBFS), crest factor,\n" +
			"integrated loudness (ITU-R BS.1770-4, LUFS), true peak (dBTP), loudness range (EBU Tech 3342, LU),\n" +
			"the largest momentary (400 ms) and short-term (3 s) loudness, the spectral centroid and the\n" +
			"one-third-octave spectrum (dB re a full-scale sine, of the channels' mean).\n\n" +
			"A level that does not exist — silence, or a file shorter than the measurement window — prints as\n" +
			"\"—\" and is null in --json output (JSON has no −∞); the \"notes\" field says why.",
		Flags: []cli.Flag{jsonFlag},
		Action: func(c *cli.Context) error {
			// The flag parser stops at the file name; "analyze FILE --json"
			// is the documented form, so a --json after it is read here.
			asJSON := c.Bool("json")
			var files []string
			for _, a := range c.Args().Slice() {
				switch {
				case a == "--json" || a == "-json" || a == "--json=true":
					asJSON = true
				case a == "--json=false":
					asJSON = false
				case strings.HasPrefix(a, "-") && a != "-":
					return usagef("analyze: unknown flag %s", a)
				default:
					files = append(files, a)
				}
			}
			if len(files) != 1 {
				return usagef("analyze takes one WAV file (got %d)", len(files))
			}
			r, err := analyze.File(c.Context, files[0])
			if err != nil {
				return err
			}
			if asJSON {
				return printJSON(c, r)
			}
			printAnalysis(c.App.Writer, r)
			return nil
		},
	}
}

// level formats a level, "—" where it does not exist.
func level(v report.Level, digits int, unit string) string {
	x := float64(v)
	if math.IsInf(x, 0) || math.IsNaN(x) {
		return "—"
	}
	return fmt.Sprintf("%.*f %s", digits, x, unit)
}

func printAnalysis(w io.Writer, r *analyze.Report) {
	fmt.Fprintf(w, "%s: %s, %.3f s (%d frames)\n", r.File, r.Format, r.Seconds, r.Frames)
	fmt.Fprintf(w, "  peak           %-14s true peak        %s\n", level(r.PeakDBFS, 2, "dBFS"), level(r.TruePeakDBTP, 2, "dBTP"))
	fmt.Fprintf(w, "  RMS            %-14s crest factor     %s\n", level(r.RMSDBFS, 2, "dBFS"), level(r.CrestDB, 2, "dB"))
	fmt.Fprintf(w, "  loudness       %-14s loudness range   %s\n", level(r.LUFS, 1, "LUFS"), level(r.LoudnessRangeLU, 1, "LU"))
	fmt.Fprintf(w, "  momentary max  %-14s short-term max   %s\n", level(r.MomentaryMaxLUFS, 1, "LUFS"), level(r.ShortTermMaxLUFS, 1, "LUFS"))
	fmt.Fprintf(w, "  centroid       %-14s DC offset        %.2e\n", level(report.Level(r.CentroidHz), 0, "Hz"), r.DCOffset)
	if r.NearFullScale > 0 {
		fmt.Fprintf(w, "  %d samples at full scale: the file may have clipped\n", r.NearFullScale)
	}
	fmt.Fprintln(w, "  one-third octaves, dB re a full-scale sine:")
	for i, b := range r.Bands {
		hz := fmt.Sprintf("%g", b.Hz)
		if b.Hz >= 1000 {
			hz = fmt.Sprintf("%gk", b.Hz/1000)
		}
		fmt.Fprintf(w, "    %6s %7s", hz, level(b.DB, 1, ""))
		if i%5 == 4 || i == len(r.Bands)-1 {
			fmt.Fprintln(w)
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintln(w, "  note: "+n)
	}
}
