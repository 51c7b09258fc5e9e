package bias

import (
	"math"

	"renderchain/chains"
	"renderchain/models"
	"renderchain/report"
)

// BiasReport is the JSON form of a Bias. The fields nodes, devices[].ref,
// .vbe_v, .vce_v, .ic_a and .region are part of the project's stable
// interface.
type BiasReport struct {
	Chain          string             `json:"chain"`
	ChainFile      string             `json:"chain_file"`
	SupplyV        float64            `json:"supply_v"`
	TemperatureC   float64            `json:"temperature_c"`
	Nodes          map[string]float64 `json:"nodes"`
	InternalNodes  map[string]float64 `json:"internal_nodes,omitempty"`
	Devices        []DeviceReport     `json:"devices"`
	Diodes         []DiodeReport      `json:"diodes"`
	FETs           []FETReport        `json:"fets"`
	OpAmps         []OpAmpReport      `json:"opamps"`
	SupplyCurrentA float64            `json:"supply_current_a"`
	SupplyPowerW   float64            `json:"supply_power_w"`
	Warnings       []string           `json:"warnings"`
	Notes          []string           `json:"notes,omitempty"`
	DCMethod       string             `json:"dc_method"`
	DCIterations   int                `json:"dc_iterations"`
	RegionRule     string             `json:"region_rule"`
	FETRegionRule  string             `json:"fet_region_rule"`

	// Stability is the pole analysis at this operating point (absent for
	// a bare circuit read without a prepared chain).
	Stability *report.Stability `json:"stability,omitempty"`

	Target     *TargetReport    `json:"target,omitempty"`
	Symmetric  *SymmetricReport `json:"symmetric,omitempty"`
	Conditions []ConditionRow   `json:"conditions,omitempty"`
}

// DeviceReport is one transistor in a BiasReport.
type DeviceReport struct {
	Ref       string          `json:"ref"`
	Kind      chains.PartKind `json:"kind"`
	Collector string          `json:"collector"`
	Base      string          `json:"base"`
	Emitter   string          `json:"emitter"`
	VcV       float64         `json:"vc_v"`
	VbV       float64         `json:"vb_v"`
	VeV       float64         `json:"ve_v"`
	VbeV      float64         `json:"vbe_v"`
	VceV      float64         `json:"vce_v"`
	VbcV      float64         `json:"vbc_v"`
	IcA       float64         `json:"ic_a"`
	IbA       float64         `json:"ib_a"`
	IeA       float64         `json:"ie_a"`
	PowerW    float64         `json:"power_w"`
	Beta      report.Number   `json:"beta_dc"`
	Region    Region          `json:"region"`
	// NearRail is "gnd" or "v+" when the collector idles with under
	// RailMargin of room to that rail (Transistor.NearRail).
	NearRail string `json:"near_rail,omitempty"`
}

// DiodeReport is one diode in a BiasReport.
type DiodeReport struct {
	Ref       string  `json:"ref"`
	Anode     string  `json:"anode"`
	Cathode   string  `json:"cathode"`
	VV        float64 `json:"v_v"`
	JunctionV float64 `json:"junction_v"`
	IA        float64 `json:"i_a"`
	PowerW    float64 `json:"power_w"`
}

// TargetReport is the JSON form of a TargetResult.
type TargetReport struct {
	Target       string    `json:"target"`
	Value        float64   `json:"target_value"`
	Unit         string    `json:"unit"`
	Adjust       string    `json:"adjust"`
	Pot          string    `json:"pot"`
	PotValue     float64   `json:"pot_ohms"`
	Taper        string    `json:"taper"`
	Start        float64   `json:"start_rotation"`
	Rotation     float64   `json:"rotation"`
	Reached      bool      `json:"reached"`
	Achieved     float64   `json:"achieved"`
	Lowest       float64   `json:"lowest"`
	Highest      float64   `json:"highest"`
	CCWWiperOhms float64   `json:"ccw_wiper_ohms"`
	WiperCWOhms  *float64  `json:"wiper_cw_ohms,omitempty"`
	Alternatives []float64 `json:"other_rotations,omitempty"`
	Solves       int       `json:"dc_solves"`
	Message      string    `json:"message"`
}

// SwingReport is one Swing in JSON.
type SwingReport struct {
	Rotation  float64       `json:"rotation"`
	IdleV     float64       `json:"idle_v"`
	UpV       float64       `json:"up_v"`
	DownV     float64       `json:"down_v"`
	Asymmetry report.Number `json:"asymmetry"`
	THDPct    report.Number `json:"thd_percent"`
}

// SymmetricReport is the JSON form of a SymmetricResult.
type SymmetricReport struct {
	Adjust       string        `json:"adjust"`
	Pot          string        `json:"pot"`
	Probe        string        `json:"probe"`
	LevelV       float64       `json:"level_v"`
	FreqHz       float64       `json:"freq_hz"`
	Start        float64       `json:"start_rotation"`
	Rotation     float64       `json:"rotation"`
	Reached      bool          `json:"reached"`
	At           SwingReport   `json:"at"`
	CCWWiperOhms float64       `json:"ccw_wiper_ohms"`
	WiperCWOhms  *float64      `json:"wiper_cw_ohms,omitempty"`
	Scan         []SwingReport `json:"scan"`
	Note         string        `json:"note,omitempty"`
}

// ConditionRow is the operating point at one supply and temperature.
type ConditionRow struct {
	SupplyV        float64            `json:"supply_v"`
	TemperatureC   float64            `json:"temperature_c"`
	Nodes          map[string]float64 `json:"nodes"`
	Devices        []DeviceReport     `json:"devices"`
	Diodes         []DiodeReport      `json:"diodes"`
	SupplyCurrentA float64            `json:"supply_current_a"`
	Warnings       []string           `json:"warnings"`
}

// RegionRule states the region thresholds in words.
func RegionRule() string {
	return sprintf("with If = Is·(exp(Vbe/Vt)−1) and Ir = Is·(exp(Vbc/Vt)−1) in NPN polarity: reverse if Ir > If and Ir ≥ %s; "+
		"cut-off if both are below %s; saturated if Ir/If exceeds the ratio at which Ic/Ib (leakage aside) falls to %g·βF; else active",
		models.FormatValue(ConductionCurrent, "A"), models.FormatValue(ConductionCurrent, "A"), SaturationGainFraction)
}

// Report returns the JSON form of b.
func (b *Bias) Report() *BiasReport {
	r := &BiasReport{Chain: b.Chain, ChainFile: b.File, SupplyV: b.Supply, TemperatureC: b.Temperature - models.ZeroCelsius,
		Nodes: map[string]float64{"gnd": 0}, SupplyCurrentA: b.SupplyCurrent, SupplyPowerW: b.SupplyPower,
		Warnings: nonNil(b.Warnings), Notes: b.Notes, DCMethod: b.Method, DCIterations: b.Iterations, RegionRule: RegionRule(),
		FETRegionRule: FETRegionRule()}
	for _, n := range b.Nodes {
		if n.Internal {
			if r.InternalNodes == nil {
				r.InternalNodes = map[string]float64{}
			}
			r.InternalNodes[n.Name] = n.Volts
		} else {
			r.Nodes[n.Name] = n.Volts
		}
	}
	r.Devices, r.Diodes = deviceReports(b)
	if b.Prepared != nil {
		r.Stability = b.Prepared.StabilityReport()
	}
	r.FETs, r.OpAmps = otherReports(b)
	return r
}

func nonNil(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

func deviceReports(b *Bias) ([]DeviceReport, []DiodeReport) {
	devs := []DeviceReport{}
	for _, t := range b.Transistors {
		beta := report.Number(t.Beta)
		if t.Ib == 0 {
			beta = report.Number(math.NaN())
		}
		devs = append(devs, DeviceReport{Ref: t.Ref, Kind: t.Kind(), Collector: t.Collector, Base: t.Base, Emitter: t.Emitter,
			VcV: t.Vc, VbV: t.Vb, VeV: t.Ve, VbeV: t.Vbe, VceV: t.Vce, VbcV: t.Vbc, IcA: t.Ic, IbA: t.Ib, IeA: t.Ie,
			PowerW: t.Power, Beta: beta, Region: t.Region, NearRail: t.NearRail})
	}
	ds := []DiodeReport{}
	for _, d := range b.Diodes {
		ds = append(ds, DiodeReport{Ref: d.Ref, Anode: d.Anode, Cathode: d.Cathode, VV: d.V, JunctionV: d.Vj, IA: d.I, PowerW: d.Power})
	}
	return devs, ds
}

// Row returns b as one row of a conditions table.
func (b *Bias) Row() ConditionRow {
	full := b.Report()
	return ConditionRow{SupplyV: b.Supply, TemperatureC: full.TemperatureC, Nodes: full.Nodes, Devices: full.Devices,
		Diodes: full.Diodes, SupplyCurrentA: b.SupplyCurrent, Warnings: full.Warnings}
}

// Report returns the JSON form of r.
func (r *TargetResult) Report() *TargetReport {
	t := &TargetReport{Target: r.Target.Text, Value: r.Target.Value, Unit: r.Target.Probe.Unit(), Adjust: r.Adjust.Key(),
		Pot: r.Adjust.PotRef(), PotValue: r.Adjust.Pot.Value, Taper: r.Adjust.Pot.Taper.String(), Start: r.Start,
		Rotation: r.Rotation, Reached: r.Reached, Achieved: r.Value, Lowest: r.Lowest, Highest: r.Highest,
		CCWWiperOhms: r.Lower, Alternatives: r.Alternatives, Solves: r.Solves, Message: r.Message()}
	if r.HasCW {
		u := r.Upper
		t.WiperCWOhms = &u
	}
	return t
}

func swingReport(s Swing) SwingReport {
	return SwingReport{Rotation: s.Rotation, IdleV: s.Idle, UpV: s.Up, DownV: s.Down, Asymmetry: report.Number(s.Asymmetry), THDPct: report.Number(100 * s.THD)}
}

// Report returns the JSON form of r.
func (r *SymmetricResult) Report() *SymmetricReport {
	s := &SymmetricReport{Adjust: r.Adjust.Key(), Pot: r.Adjust.PotRef(), Probe: r.Probe, LevelV: r.Options.Level, FreqHz: r.Options.Freq,
		Start: r.Start, Rotation: r.Rotation, Reached: r.Reached, At: swingReport(r.At), CCWWiperOhms: r.Lower, Note: r.Note}
	if r.HasCW {
		u := r.Upper
		s.WiperCWOhms = &u
	}
	for _, w := range r.Scan {
		s.Scan = append(s.Scan, swingReport(w))
	}
	return s
}
