package main

import (
	"fmt"
	"strings"
	"text/tabwriter"

	"github.com/urfave/cli/v2"

	"renderchain/chains"
	"renderchain/models"
)

func templatesCommand() *cli.Command {
	return &cli.Command{
		Name:      "templates",
		Usage:     "list the built-in stage templates with their parts and knobs",
		UsageText: "renderchain templates [NAME…] [--json]",
		Flags:     []cli.Flag{jsonFlag},
		Action: func(c *cli.Context) error {
			all, err := chains.Templates()
			if err != nil {
				return err
			}
			want := map[string]bool{}
			for _, a := range c.Args().Slice() {
				want[a] = true
				if _, err := chains.LoadTemplate(a); err != nil {
					return err
				}
			}
			var list []*chains.Template
			for _, t := range all {
				if len(want) == 0 || want[t.Name] {
					list = append(list, t)
				}
			}
			if c.Bool("json") {
				return printJSON(c, templatesJSON(list))
			}
			w := tabwriter.NewWriter(c.App.Writer, 2, 4, 2, ' ', 0)
			for _, t := range list {
				fmt.Fprintf(w, "%s\n  %s\n", t.Name, t.About)
				for _, k := range t.Knobs {
					fmt.Fprintf(w, "  knob %s\tdefault %.2f\t%s\n", k.Name, k.Default, k.About)
				}
				for _, p := range t.Parts {
					fmt.Fprintf(w, "  %s\t%s\t%s\t%s\n", p.Ref, p.Kind, partValue(p), pins(p))
				}
				fmt.Fprintln(w)
			}
			return w.Flush()
		},
	}
}

func partValue(p *chains.Part) string {
	switch {
	case p.Kind.Device() || p.Kind == chains.Transformer || p.Kind == chains.Switch:
		var s []string
		if p.Model != "" {
			s = append(s, p.Model)
		}
		for _, k := range chains.ParamNames(p.Kind) {
			if v, ok := p.Params[k]; ok {
				s = append(s, fmt.Sprintf("%s=%g", k, v))
			}
		}
		for i, w := range p.Windings {
			l := models.FormatValue(w.Inductance, "H")
			if w.Turns > 0 {
				l = fmt.Sprintf("turns %g", w.Turns)
			}
			s = append(s, fmt.Sprintf("w%d %s %s", i+1, l, models.FormatValue(w.Resistance, "Ω")))
		}
		if p.Kind == chains.Switch {
			s = append(s, fmt.Sprintf("positions %s, at %s", strings.Join(p.PositionNames(), "|"), p.Text))
		}
		return strings.Join(s, " ")
	case p.Kind == chains.Pot:
		return p.Text + " " + p.Taper.String() + " (knob " + p.Knob + ")"
	}
	return p.Text
}

func pins(p *chains.Part) string {
	var s []string
	for _, role := range p.PinRoles() {
		n := p.Pins[role]
		if role == "1" || role == "2" {
			s = append(s, n)
		} else {
			s = append(s, role+"="+n)
		}
	}
	return strings.Join(s, " ")
}

type templateJSON struct {
	Name  string            `json:"name"`
	About string            `json:"about"`
	Knobs []chains.KnobInfo `json:"knobs"`
	Parts []partJSON        `json:"parts"`
}

type partJSON struct {
	Ref   string `json:"ref"`
	Kind  string `json:"kind"`
	Value string `json:"value"`
	Pins  string `json:"pins"`
	About string `json:"about,omitempty"`
}

func templatesJSON(list []*chains.Template) []templateJSON {
	var out []templateJSON
	for _, t := range list {
		tj := templateJSON{Name: t.Name, About: t.About, Knobs: t.Knobs}
		for _, p := range t.Parts {
			tj.Parts = append(tj.Parts, partJSON{Ref: p.Ref, Kind: p.Kind.String(), Value: partValue(p), Pins: pins(p), About: p.About})
		}
		out = append(out, tj)
	}
	return out
}
