package parts

import (
	"math"
	"strings"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/models"
	"renderchain/report"
)

// otherLine fills a parts-list line for the kinds beyond the passive parts,
// diodes and transistors: FETs, op-amps, transformers and switches.
// vmin is the least voltage rating (CapacitorMargin × the supply).
func otherLine(l *BOMLine, p *chains.Part, b *bias.Bias, ref string, vmin float64) {
	model := p.Model
	switch {
	case p.Kind.FET():
		name := p.Kind.String()
		if model != "" && model != name {
			name += " " + model
		}
		if p.Kind == chains.NJFET || p.Kind == chains.PJFET {
			jp := p.JFETParams()
			l.Value = sprintf("%s Idss %s, pinch-off %s", name, models.FormatValue(jp.Idss, "A"), models.FormatValue(jp.Pinchoff, "V"))
		} else {
			mp := p.MOSFETParams()
			l.Value = sprintf("%s threshold %s", name, models.FormatValue(mp.Threshold, "V"))
		}
		l.order = l.Value
		l.MinVoltage = report.Number(vmin)
		l.Rating = sprintf("Vds ≥ %s", models.FormatValue(vmin, "V"))
		if f := b.FET(ref); f != nil {
			l.IdleVolts, l.IdlePower = report.Number(f.Vds), report.Number(f.Power)
			l.MinPower = report.Number(PowerMargin * f.Power)
			l.Rating = sprintf("Pd ≥ %s, Vds ≥ %s", models.FormatValue(float64(l.MinPower), "W"), models.FormatValue(vmin, "V"))
			l.Note = sprintf("idle Id %s, %s", models.FormatValue(f.Id, "A"), f.Region)
		}
		if p.Kind == chains.NJFET || p.Kind == chains.PJFET {
			l.Note += "; Idss and pinch-off spread widely within one type (common practice): measure the part, or trim its source resistor"
		}
	case p.Kind == chains.OpAmp:
		if model == "" {
			model = "opamp-general-dual"
		}
		l.Value = "opamp " + model
		l.order = l.Value
		l.Rating = sprintf("rated for ≥ %s across its rails", models.FormatValue(vmin, "V"))
		l.MinVoltage = report.Number(vmin)
		if a := b.OpAmp(ref); a != nil {
			l.IdleVolts = report.Number(a.Vout)
			l.Note = sprintf("output idles at %s: %s of room up, %s down", models.FormatValue(a.Vout, "V"),
				models.FormatValue(a.RoomUp, "V"), models.FormatValue(a.RoomDown, "V"))
		}
	case p.Kind == chains.Transformer:
		tp := p.TransformerParams()
		var ws []string
		for i, w := range tp.Windings {
			ws = append(ws, sprintf("w%d %s %s", i+1, models.FormatValue(w.Inductance, "H"), models.FormatValue(w.Resistance, "Ω")))
		}
		l.Value = sprintf("transformer k %g: %s", tp.Coupling, strings.Join(ws, ", "))
		l.order = l.Value
		l.Rating = "small-signal audio transformer"
		worst := 0.0
		for i, w := range tp.Windings {
			if e := b.Circuit.Element(models.InternalNode(ref, sprintf("r%d", i+1))); e != nil && w.Resistance > 0 {
				worst = math.Max(worst, math.Abs(elementVoltage(b.DC, b.Circuit, e)/w.Resistance))
			}
		}
		if worst > 0 {
			l.Rating = sprintf("DC in a winding ≥ %s (small cores saturate with DC)", models.FormatValue(worst, "A"))
		}
		l.Note = "never connect a winding of any transformer to the mains: that is work for qualified people under local electrical codes"
	case p.Kind == chains.Switch:
		poles := 0
		for _, pos := range p.Positions {
			poles = max(poles, len(pos.Connect))
		}
		l.Value = sprintf("switch %d-position, %d contact(s) per position: %s", len(p.Positions), poles, strings.Join(p.PositionNames(), ", "))
		l.order = l.Value
		l.Rating = "signal-level contacts"
		l.Note = sprintf("set to %s (position %d)", p.Text, p.Position+1)
	}
}

// elementVoltage is the DC voltage across a two-pin element of c.
func elementVoltage(op *mna.OperatingPoint, c *models.Circuit, e *models.Element) float64 {
	return op.Node[e.Nodes[0]] - op.Node[e.Nodes[1]]
}
