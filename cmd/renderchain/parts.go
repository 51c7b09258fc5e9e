package main

import (
	"fmt"
	"io"
	"math"
	"text/tabwriter"

	"github.com/urfave/cli/v2"

	"renderchain/models"
	"renderchain/parts"
)

func partsCommand() *cli.Command {
	return &cli.Command{
		Name:      "parts",
		Usage:     "parts list: values with nearest E12 and E24, tolerances, idle dissipation and rating hints",
		UsageText: "renderchain parts --chain F [--set K=V]… [--csv | --json] [--all-stages]",
		Description: "Ratings are rules of thumb (common practice) for battery-powered small-signal builds.\n" +
			"Mains-powered supplies are outside what this list checks.",
		Flags: []cli.Flag{
			chainFlag, setFlag, jsonFlag,
			&cli.BoolFlag{Name: "csv", Usage: "print the list as CSV (one row per part)"},
			&cli.BoolFlag{Name: "all-stages", Usage: "list the pickup and amplifier-input stages too"},
		},
		Before: requireFlags("chain"),
		Action: func(c *cli.Context) error {
			if c.NArg() > 0 {
				return usagef("parts takes no arguments (got %q)", c.Args().First())
			}
			if c.Bool("csv") && c.Bool("json") {
				return usagef("--csv and --json exclude each other")
			}
			ch, err := loadChain(c)
			if err != nil {
				return err
			}
			bom, err := parts.PartsListContext(c.Context, ch, c.Bool("all-stages"))
			if err != nil {
				return err
			}
			switch {
			case c.Bool("json"):
				return printJSON(c, bom)
			case c.Bool("csv"):
				return bom.WriteCSV(c.App.Writer)
			}
			partsPrint(c.App.Writer, bom)
			return nil
		},
	}
}

func partsPrint(w io.Writer, b *parts.BOM) {
	fmt.Fprintf(w, "%s (%s), %s supply\n\n", b.Chain, b.File, models.FormatValue(b.Supply, "V"))
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "ref\tkind\tvalue\tE12\tE24\ttol\tidle P\trating\tnote")
	for _, l := range b.Lines {
		tol := ""
		if t := float64(l.Tolerance); !math.IsNaN(t) {
			tol = fmt.Sprintf("±%g %%", t)
		}
		p := ""
		if v := float64(l.IdlePower); !math.IsNaN(v) && v > 0 {
			p = watts(v) // 0 under the display floor, as in bias
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", l.Ref, l.Kind, l.Value, l.E12, l.E24, tol, p, l.Rating, l.Note)
	}
	tw.Flush()
	fmt.Fprintln(w, "\nto order:")
	tw = tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	for _, o := range b.Order {
		fmt.Fprintf(tw, "  %d ×\t%s\t%s\t%s\t%s\n", o.Count, o.Kind, o.Value, o.Rating, o.RefsText())
	}
	tw.Flush()
	fmt.Fprintln(w)
	for _, n := range b.Notes {
		fmt.Fprintln(w, "note: "+n)
	}
}
