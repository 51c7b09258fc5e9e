package parts

import (
	"context"
	"encoding/csv"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/eseries"
	"renderchain/models"
	"renderchain/report"
)

// Capacitor voltage ratings offered (common practice: the usual steps of
// film and electrolytic capacitors).
var capacitorRatings = []float64{6.3, 10, 16, 25, 35, 50, 63, 100, 160, 250, 400, 630}

// Resistor power ratings offered, W.
var resistorRatings = []float64{0.25, 0.5, 1, 2, 5}

// Rating rules (common practice): a capacitor rated for at least
// CapacitorMargin × the supply's magnitude (16 V on a 9 V rail); a resistor,
// pot or transistor for at least PowerMargin × its idle dissipation; a
// transistor's Vceo and a diode's reverse rating at least
// CapacitorMargin × the supply.
const (
	CapacitorMargin = 1.5
	PowerMargin     = 2.0
)

// ElectrolyticFrom is the capacitance from which a capacitor is taken to be
// an electrolytic and given a polarity hint.
const ElectrolyticFrom = 1e-6

// BOMLine is one part of the parts list.
type BOMLine struct {
	Ref           string          `json:"ref"`
	Kind          chains.PartKind `json:"kind"`
	Value         string          `json:"value"`
	ValueSI       report.Number   `json:"value_si"`
	Written       string          `json:"written,omitempty"`
	E12           string          `json:"e12,omitempty"`
	E24           string          `json:"e24,omitempty"`
	Series        string          `json:"series,omitempty"`
	Tolerance     report.Number   `json:"tolerance_percent"`
	ToleranceRule string          `json:"tolerance_rule,omitempty"`
	IdleVolts     report.Number   `json:"idle_v"`
	IdlePower     report.Number   `json:"idle_power_w"`
	// MinVoltage is the least voltage rating to buy (capacitors, and
	// transistors' Vceo, diodes' reverse rating); MinPower the least power
	// rating (resistors, pots, transistors).
	MinVoltage report.Number `json:"min_voltage_v,omitempty"`
	MinPower   report.Number `json:"min_power_w,omitempty"`
	Rating     string        `json:"rating"`
	Note       string        `json:"note,omitempty"`

	e12, e24 float64
	order    string
}

// OrderLine groups identical parts for ordering.
type OrderLine struct {
	Kind   chains.PartKind `json:"kind"`
	Value  string          `json:"value"`
	Count  int             `json:"count"`
	Rating string          `json:"rating"`
	Refs   []string        `json:"refs"`
}

// BOM is a chain's parts list.
type BOM struct {
	Chain  string      `json:"chain"`
	File   string      `json:"chain_file"`
	Supply float64     `json:"supply_v"`
	Lines  []BOMLine   `json:"parts"`
	Order  []OrderLine `json:"order"`
	Notes  []string    `json:"notes"`
}

// PartsList builds the parts list of the chain's stages (the environment
// stages only with allStages): each part's value with its nearest E12 and
// E24 values, the tolerance rule's figure, its idle voltage and
// dissipation from the DC operating point, and the rating hints.
func PartsList(ch *chains.Chain, allStages bool) (*BOM, error) {
	return PartsListContext(context.Background(), ch, allStages)
}

// PartsListContext is PartsList whose DC solve stops when ctx is done.
func PartsListContext(ctx context.Context, ch *chains.Chain, allStages bool) (*BOM, error) {
	b, err := bias.SolveContext(ctx, ch)
	if err != nil {
		return nil, err
	}
	idx := map[string]int{}
	for i, e := range b.Circuit.Elements {
		idx[e.Ref] = i
	}
	across := func(ref string) (float64, bool) {
		i, ok := idx[ref]
		if !ok {
			return 0, false
		}
		return b.DC.ElementVoltage(i), true
	}
	supply := math.Abs(ch.Supply)
	vmin := CapacitorMargin * supply
	bom := &BOM{Chain: ch.Name, File: ch.File, Supply: ch.Supply}
	for _, st := range ch.PartStages() {
		if st.Environment && !allStages {
			continue
		}
		for _, p := range st.Parts {
			if ch.CellResistance(st, p) {
				continue // the battery's own resistance: nothing to order
			}
			ref := st.ID + "." + p.Ref
			l := BOMLine{Ref: ref, Kind: p.Kind, Written: p.Text, ValueSI: report.Number(p.Value),
				IdleVolts: report.Number(math.NaN()), IdlePower: report.Number(math.NaN()), Tolerance: report.Number(math.NaN())}
			if tol, rule := Tolerance(p); tol > 0 {
				l.Tolerance, l.ToleranceRule = report.Number(100*tol), rule
			}
			switch p.Kind {
			case chains.Resistor, chains.Capacitor, chains.Inductor, chains.Cable:
				unit := p.Kind.Unit()
				l.Value = models.FormatValue(p.Value, unit)
				if p.Kind == chains.Resistor || p.Kind == chains.Capacitor {
					l.e12, l.e24 = eseries.E12.Nearest(p.Value), eseries.E24.Nearest(p.Value)
					l.E12, l.E24 = models.FormatValue(l.e12, unit), models.FormatValue(l.e24, unit)
					l.Series = "off-series"
					if s := eseries.Classify(p.Value); s != nil {
						l.Series = s.Name
					}
				}
				v, _ := across(ref)
				l.IdleVolts = report.Number(v)
				switch p.Kind {
				case chains.Resistor:
					pw := v * v / p.Value
					l.IdlePower = report.Number(pw)
					l.MinPower = report.Number(pick(resistorRatings, PowerMargin*pw))
					l.Rating = ratingW(float64(l.MinPower))
				case chains.Capacitor:
					l.IdlePower = 0
					need := math.Max(vmin, CapacitorMargin*math.Abs(v))
					l.MinVoltage = report.Number(pick(capacitorRatings, need))
					l.Rating = sprintf("≥ %s", models.FormatValue(float64(l.MinVoltage), "V"))
					if r, ok := p.Params["rating"]; ok {
						l.Rating = sprintf("%s as written", models.FormatValue(r, "V"))
						if r < need {
							l.Rating += sprintf("; needs ≥ %s", models.FormatValue(float64(l.MinVoltage), "V"))
						}
					}
					if p.Value >= ElectrolyticFrom || p.Polarized {
						l.Note = polarity(ch, st, p, v)
					}
				case chains.Cable:
					l.Value += sprintf(" at %s/m", models.FormatValue(p.PerMetre, "F"))
				}
				l.order = l.Value
			case chains.Pot:
				l.Value = models.FormatValue(p.Value, "Ω") + " " + p.Taper.String()
				pw := 0.0
				for _, sec := range []string{".ccw", ".cw"} {
					if i, ok := idx[ref+sec]; ok {
						v := b.DC.ElementVoltage(i)
						pw += v * v / b.Circuit.Elements[i].Value
					}
				}
				l.IdlePower = report.Number(pw)
				l.MinPower = report.Number(PowerMargin * pw)
				l.Rating = "no DC through it"
				if pw > 1e-9 {
					l.Rating = sprintf("track ≥ %s", models.FormatValue(float64(l.MinPower), "W"))
				}
				x := st.Knobs[p.Knob]
				lo, hi := models.PotSections(p.Value, p.Taper, x)
				l.Note = sprintf("knob %s at %.2f: %s ccw–wiper", p.Knob, x, models.FormatValue(lo, "Ω"))
				if _, ok := p.Pins["cw"]; ok {
					l.Note += sprintf(", %s wiper–cw", models.FormatValue(hi, "Ω"))
				}
				if p.Adjusts != "" {
					l.Note += sprintf("; trimmer for %s (set it with a bias target)", p.Adjusts)
				}
				l.order = l.Value
			case chains.NPN, chains.PNP:
				bp := p.BJTParams()
				model := p.Model
				if model == "" {
					model = "si-" + p.Kind.String()
				}
				l.Value = sprintf("%s %s hFE %g", p.Kind, model, bp.BetaF)
				l.order = p.Kind.String() + " " + model
				if t := b.Transistor(ref); t != nil {
					l.IdleVolts, l.IdlePower = report.Number(t.Vce), report.Number(t.Power)
					l.MinPower = report.Number(PowerMargin * t.Power)
					l.MinVoltage = report.Number(vmin)
					l.Rating = sprintf("Pd ≥ %s, Vceo ≥ %s", models.FormatValue(float64(l.MinPower), "W"), models.FormatValue(vmin, "V"))
					l.Note = sprintf("idle Ic %s, %s", report.Quantity(t.Ic, report.CurrentFloor, "A"), t.Region)
				}
				if bp.Icbo > 0 {
					l.Note += sprintf("; leakage Icbo %s at 25 °C, about doubling per %g °C", models.FormatValue(bp.Icbo, "A"), bp.LeakDoubling)
				}
			case chains.Diode:
				model := p.Model
				if model == "" {
					model = "si-signal"
				}
				l.Value = "diode " + model
				l.order = l.Value
				l.MinVoltage = report.Number(vmin)
				l.Rating = sprintf("reverse ≥ %s", models.FormatValue(vmin, "V"))
				if bv := p.DiodeParams().BreakdownVoltage; bv > 0 && bv < vmin {
					l.MinVoltage = report.Number(math.NaN())
					l.Rating = sprintf("breaks down at %s by design (zener)", models.FormatValue(bv, "V"))
				}
				for _, d := range b.Diodes {
					if d.Ref == ref {
						l.IdleVolts, l.IdlePower = report.Number(d.V), report.Number(d.Power)
						l.Note = sprintf("idle %s", report.Quantity(d.I, report.CurrentFloor, "A"))
					}
				}
			default:
				otherLine(&l, p, b, ref, vmin)
			}
			bom.Lines = append(bom.Lines, l)
		}
	}
	bom.Order = group(bom.Lines)
	bom.Notes = []string{
		sprintf("capacitors rated at least %g × the %s supply (common practice: 16 V parts on a 9 V rail)", CapacitorMargin, models.FormatValue(supply, "V")),
		sprintf("resistors, pots and transistors rated at least %g × their idle dissipation; 1/4 W resistors are the smallest offered here", PowerMargin),
		"pots and trimmers are sold in 1–2–5 or 1–2.5–5 steps rather than E-series values (common practice)",
		"electrolytic polarity and idle voltages are from the DC operating point at the chain's supply and temperature",
	}
	return bom, nil
}

// pick returns the smallest rating ≥ need (or need itself beyond the list).
func pick(list []float64, need float64) float64 {
	for _, r := range list {
		if r >= need {
			return r
		}
	}
	return need
}

func ratingW(w float64) string {
	switch w {
	case 0.25:
		return "1/4 W"
	case 0.5:
		return "1/2 W"
	}
	return models.FormatValue(w, "W")
}

// polarity says which way round an electrolytic goes, from the DC voltage
// v across it (pin 1 minus pin 2); for a capacitor written polarized, the
// written way round, or where it should go when that idles reversed (the
// threshold of the chain lint's warning).
func polarity(ch *chains.Chain, st *chains.Stage, p *chains.Part, v float64) string {
	node := func(pin string) string { return ch.Wiring().Node(st.ID, p.Pins[pin]) }
	if p.Polarized {
		if v < -chains.ReverseBias {
			return sprintf("electrolytic written + to %s, but that lead idles %s below the other: fit + to %s", node("1"), models.FormatValue(-v, "V"), node("2"))
		}
		return sprintf("electrolytic: + to %s as written (%s across at idle)", node("1"), models.FormatValue(v, "V"))
	}
	if math.Abs(v) < 0.05 {
		return sprintf("electrolytic: %s across at idle, non-polarised or either way round", models.FormatValue(v, "V"))
	}
	plus := p.Pins["1"]
	if v < 0 {
		plus = p.Pins["2"]
	}
	return sprintf("electrolytic: + to %s (%s across at idle)", ch.Wiring().Node(st.ID, plus), models.FormatValue(math.Abs(v), "V"))
}

// kindOrder is the order of kinds in the order list: resistors and pots,
// then capacitors, inductors, cable, diodes and transistors.
var kindOrder = map[chains.PartKind]int{chains.Resistor: 0, chains.Pot: 1, chains.Capacitor: 2, chains.Inductor: 3,
	chains.Cable: 4, chains.Diode: 5, chains.NPN: 6, chains.PNP: 7, chains.NJFET: 8, chains.PJFET: 9, chains.NMOSFET: 10,
	chains.PMOSFET: 11, chains.OpAmp: 12, chains.Transformer: 13, chains.Switch: 14}

func group(lines []BOMLine) []OrderLine {
	type key struct {
		kind          chains.PartKind
		value, rating string
	}
	m := map[key]*OrderLine{}
	var keys []key
	for _, l := range lines {
		k := key{l.Kind, l.order, l.Rating}
		if l.Kind.Transistor() || l.Kind.FET() {
			k.rating = ""
		}
		o, ok := m[k]
		if !ok {
			o = &OrderLine{Kind: l.Kind, Value: l.order, Rating: k.rating}
			m[k] = o
			keys = append(keys, k)
		}
		o.Count++
		o.Refs = append(o.Refs, l.Ref)
	}
	sort.SliceStable(keys, func(i, j int) bool {
		a, b := keys[i], keys[j]
		if kindOrder[a.kind] != kindOrder[b.kind] {
			return kindOrder[a.kind] < kindOrder[b.kind]
		}
		va, vb := lineValue(lines, m[a].Refs[0]), lineValue(lines, m[b].Refs[0])
		if va != vb {
			return va < vb
		}
		return a.value < b.value
	})
	out := make([]OrderLine, len(keys))
	for i, k := range keys {
		out[i] = *m[k]
	}
	return out
}

func lineValue(lines []BOMLine, ref string) float64 {
	for _, l := range lines {
		if l.Ref == ref {
			return float64(l.ValueSI)
		}
	}
	return 0
}

// CSVHeader is the header row WriteCSV writes.
var CSVHeader = []string{"ref", "kind", "value", "e12", "e24", "series", "tolerance_percent", "tolerance_rule", "idle_v", "idle_power_w", "rating", "note"}

// WriteCSV writes the parts list as CSV (RFC 4180), one row per part.
func (b *BOM) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(CSVHeader); err != nil {
		return err
	}
	num := func(n report.Number, prec int) string {
		f := float64(n)
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return ""
		}
		return strconv.FormatFloat(f, 'g', prec, 64)
	}
	for _, l := range b.Lines {
		rec := []string{l.Ref, l.Kind.String(), l.Value, l.E12, l.E24, l.Series, num(l.Tolerance, 4), l.ToleranceRule,
			num(l.IdleVolts, 5), num(l.IdlePower, 4), l.Rating, l.Note}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// RefsText joins an order line's refs.
func (o OrderLine) RefsText() string { return strings.Join(o.Refs, " ") }
