package parts

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"math"
	"sort"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/internal/testchains"
	"renderchain/report"
)

const oneResistor = `
name = "one resistor into the load"
supply = "9V"
[input]
source = "ideal"
[output]
load = "1M"
[[stage]]
id = "div"
parts = [ { ref = "R1", kind = "resistor", value = "5k1", pins = ["in", "out"] } ]
`

// The same seed gives the same result, byte for byte, whatever the number
// of workers; another seed gives another.
func TestSpreadReproducible(t *testing.T) {
	ch := testchains.SiPair().Parse(t)
	run := func(seed uint64, workers int) []byte {
		r, err := Spread(context.Background(), ch, SpreadOptions{Trials: 24, Seed: seed, Workers: workers, NoTHD: true, HFEBin: []float64{126, 158, 231, 304}})
		if err != nil {
			t.Fatal(err)
		}
		b, err := json.Marshal(r)
		if err != nil {
			t.Fatal(err)
		}
		var csvBuf bytes.Buffer
		if err := r.WriteCSV(&csvBuf); err != nil {
			t.Fatal(err)
		}
		return append(b, csvBuf.Bytes()...)
	}
	a, b, c := run(7, 1), run(7, 3), run(8, 2)
	if !bytes.Equal(a, b) {
		t.Error("seed 7 gave different output on 1 and 3 workers")
	}
	if bytes.Equal(a, c) {
		t.Error("seeds 7 and 8 gave the same output")
	}
}

// The drawn values of one E24 resistor (±5 % by the E-series rule) follow
// the configured distribution: the 5th, 50th and 95th percentiles of 4000
// draws lie within 4 standard errors of the distribution's quantiles, the
// standard error of a sample p-quantile being √(p(1−p)/N)/f(x_p) (the
// asymptotic normality of sample quantiles; e.g. Cramér, "Mathematical
// Methods of Statistics", 1946, sec. 28.5). Quantiles of the truncated
// normal come from gonum's distuv.Normal. The gain column is Ohm's-law
// division into the 1 MΩ load at the nominal value.
func TestSpreadDrawsFollowDistribution(t *testing.T) {
	ch, err := chains.Parse("r.toml", oneResistor)
	if err != nil {
		t.Fatal(err)
	}
	const n, r0, tol = 4000, 5100.0, 0.05
	std := distuv.Normal{Mu: 0, Sigma: 1}
	mass := std.CDF(3) - std.CDF(-3)
	for _, d := range []Distribution{Normal, Uniform} {
		res, err := Spread(context.Background(), ch, SpreadOptions{Trials: n, Seed: 42, Distribution: d, NoTHD: true})
		if err != nil {
			t.Fatal(err)
		}
		pd := res.Part("div.R1")
		if pd == nil || pd.Tolerance != 5 || pd.Rule != "E24 value" {
			t.Fatalf("%s: part draw %+v", d, pd)
		}
		for _, p := range []float64{0.05, 0.5, 0.95} {
			var q, dens float64
			switch d {
			case Uniform:
				q = r0 * (1 - tol + 2*tol*p)
				dens = 1 / (2 * tol * r0)
			case Normal:
				sigma := r0 * tol / 3
				z := std.Quantile(std.CDF(-3) + p*mass)
				q = r0 + sigma*z
				dens = std.Prob(z) / (sigma * mass)
			}
			se := math.Sqrt(p*(1-p)/n) / dens
			got := map[float64]report.Number{0.05: pd.P5, 0.5: pd.P50, 0.95: pd.P95}[p]
			t.Logf("%s p%.0f: drawn %.2f Ω, distribution %.2f Ω, diff %.2f Ω (4 SE = %.2f Ω)", d, 100*p, float64(got), q, float64(got)-q, 4*se)
			if math.Abs(float64(got)-q) > 4*se {
				t.Errorf("%s p%.0f: %.2f Ω, want %.2f ± %.2f Ω", d, 100*p, float64(got), q, 4*se)
			}
		}
		if lo, hi := float64(pd.Min), float64(pd.Max); lo < r0*(1-tol) || hi > r0*(1+tol) {
			t.Errorf("%s: draws %g … %g outside ±5 %%", d, lo, hi)
		}
		g := res.Quantity("gain_db")
		if want := 20 * math.Log10(1e6/(1e6+r0)); math.Abs(float64(g.Nominal)-want) > 1e-9 {
			t.Errorf("nominal gain %.9f dB, divider %.9f dB", float64(g.Nominal), want)
		}
	}
}

// hFE from a bin: each trial takes distinct devices from the list, every
// device about equally often (4 devices, 2 transistors: each appears in a
// trial with probability 1/2; allowed 4 binomial standard deviations).
func TestSpreadHFEBin(t *testing.T) {
	ch := testchains.SiPair().Parse(t)
	bin := []float64{126, 158, 231, 304}
	const n = 400
	res, err := Spread(context.Background(), ch, SpreadOptions{Trials: n, Seed: 3, NoTHD: true, HFEBin: bin})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	res.WriteCSV(&buf)
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := func(name string) int {
		for i, h := range rows[0] {
			if h == name {
				return i
			}
		}
		t.Fatalf("no column %s in %v", name, rows[0])
		return -1
	}
	c1, c2 := col("fz.Q1.hfe"), col("fz.Q2.hfe")
	count := map[float64]int{}
	for _, r := range rows[1:] {
		h1, _ := strconv.ParseFloat(r[c1], 64)
		h2, _ := strconv.ParseFloat(r[c2], 64)
		if h1 == h2 {
			t.Fatalf("trial %s used one device twice (%g)", r[0], h1)
		}
		count[h1]++
		count[h2]++
	}
	sd := math.Sqrt(n * 0.5 * 0.5)
	for _, h := range bin {
		if math.Abs(float64(count[h])-n/2) > 4*sd {
			t.Errorf("hFE %g in %d of %d trials, want %d ± %.0f", h, count[h], n, n/2, 4*sd)
		}
	}
	if len(rows) != n+1 {
		t.Errorf("%d CSV rows", len(rows))
	}
}

// A spec no trial meets is a message and a zero yield, whose Wilson upper
// bound for 0 of n is z²/(n + z²) in closed form (Wilson 1927).
func TestSpreadSpecs(t *testing.T) {
	ch := testchains.SiPair().Parse(t)
	never, err := ParseSpec(ch, "fz.Q2.vc=20..30V")
	if err != nil {
		t.Fatal(err)
	}
	wide, _ := ParseSpec(ch, "fz.Q2.vce=0..9V")
	gain, _ := ParseSpec(ch, "gain=10..")
	const n = 30
	res, err := Spread(context.Background(), ch, SpreadOptions{Trials: n, Seed: 1, NoTHD: true, Specs: []*Spec{never, wide, gain}})
	if err != nil {
		t.Fatal(err)
	}
	if res.Specs[0].Pass != 0 || !strings.Contains(res.Specs[0].Message, "no trial meets") || res.Specs[1].Pass != n || res.Specs[2].Pass != n {
		t.Errorf("specs %+v", res.Specs)
	}
	z := 1.959963984540054
	if float64(*res.Yield) != 0 || math.Abs(float64(*res.YieldHigh)-z*z/(n+z*z)) > 1e-12 || float64(*res.YieldLow) != 0 {
		t.Errorf("yield %v [%v, %v]", *res.Yield, *res.YieldLow, *res.YieldHigh)
	}
	// Wilson's interval for k of n against its textbook value for 8 of 10:
	// 0.4902 … 0.9433 (four decimals, computed from the formula by hand).
	lo, hi := Wilson(8, 10)
	if math.Abs(lo-0.4902) > 1e-4 || math.Abs(hi-0.9433) > 1e-4 {
		t.Errorf("Wilson(8, 10) = %.4f, %.4f", lo, hi)
	}
	for _, bad := range []string{"fz.Q2.vc=5..4V", "fz.Q2.vc=4V", "fz.Q2.vc=..", "gain=a..b", "fz.Q7.vc=1..2V"} {
		if _, err := ParseSpec(ch, bad); err == nil {
			t.Errorf("spec %q accepted", bad)
		}
	}
	thd, _ := ParseSpec(ch, "thd=..10%")
	if _, err := Spread(context.Background(), ch, SpreadOptions{Trials: 2, NoTHD: true, Specs: []*Spec{thd}}); err == nil {
		t.Error("a THD spec without THD accepted")
	}
}

// Re-trimmed trials all sit on the target (within 10 mV) whatever their
// parts, and the trimmer settings spread instead.
func TestSpreadRetrim(t *testing.T) {
	ch := testchains.SiPair().Parse(t)
	tg, _ := bias.ParseTarget(ch, "fz.Q2.vc=4.5V")
	adj, _ := bias.AdjusterFor(ch, tg, "")
	res, err := Spread(context.Background(), ch, SpreadOptions{Trials: 20, Seed: 5, NoTHD: true, Retrim: tg, RetrimAdjust: adj, HFEBin: []float64{126, 158, 231, 304}})
	if err != nil {
		t.Fatal(err)
	}
	vc := res.Quantity("fz.Q2.vc")
	if math.Abs(float64(vc.Min)-4.5) > 0.01 || math.Abs(float64(vc.Max)-4.5) > 0.01 || res.Untrimmable != 0 {
		t.Errorf("re-trimmed Vc2 spans %v … %v, %d untrimmable", vc.Min, vc.Max, res.Untrimmable)
	}
	rot := res.Quantity("fz.trim2")
	if rot == nil || float64(rot.Max)-float64(rot.Min) < 0.01 {
		t.Errorf("trimmer settings %+v", rot)
	}
}

// THD of a linear chain is nil to the measurement's floor, and a clipping
// chain's is large: a sanity bound on the rendered sine, not a model check.
func TestSpreadTHD(t *testing.T) {
	lin, _ := chains.Parse("r.toml", oneResistor)
	res, err := Spread(context.Background(), lin, SpreadOptions{Trials: 2, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if thd := res.Quantity("thd_percent"); !(float64(thd.Max) < 0.01) {
		t.Errorf("THD of a resistor: %v %%", thd.Max)
	}
	res, err = Spread(context.Background(), testchains.SiPair().Parse(t), SpreadOptions{Trials: 2, Seed: 1, Amplitude: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	if thd := res.Quantity("thd_percent"); !(float64(thd.Min) > 10) {
		t.Errorf("THD of the clipping pair at 100 mV: %v %%", thd.Min)
	}
}

func TestPercentile(t *testing.T) {
	// Hyndman & Fan definition 7 on 1..5: h = 4p.
	x := []float64{1, 2, 3, 4, 5}
	for _, c := range []struct{ p, want float64 }{{0, 1}, {0.05, 1.2}, {0.5, 3}, {0.95, 4.8}, {1, 5}, {0.375, 2.5}} {
		if got := Percentile(x, c.p); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("Percentile(%g) = %g, want %g", c.p, got, c.want)
		}
	}
	if !math.IsNaN(Percentile(nil, 0.5)) {
		t.Error("percentile of nothing")
	}
}

// A JFET's pinch-off is drawn log-uniformly within ×/÷ FETSpread and its
// Idss follows with the square law's β = Idss/Vp² held (Shichman & Hodges
// 1968: Idss = β·Vp²): every draw keeps β to 1e-12 relative and stays in
// the band, and the quantiles of ln(Vp/Vp0) are those of the uniform
// distribution on ±ln 1.5 (gonum's distuv.Uniform) within 4 standard
// errors of a sample quantile (Cramér 1946, sec. 28.5, as above).
func TestSpreadJFETPinchoff(t *testing.T) {
	ch, err := chains.Load("../chains/examples/jfet-boost.toml")
	if err != nil {
		t.Fatal(err)
	}
	opt := SpreadOptions{Trials: 1}
	if err := opt.resolve(); err != nil {
		t.Fatal(err)
	}
	pl := plan(ch, &opt)
	k := -1
	for i, v := range pl {
		if v.param == "pinchoff" {
			k = i
		}
	}
	if k < 0 || opt.FETSpread != DefaultFETSpread {
		t.Fatalf("no pinch-off draw in the plan %+v (spread %g)", pl, opt.FETSpread)
	}
	j0 := findPart(ch, "boost", "Q1").JFETParams()
	beta := j0.Idss / (j0.Pinchoff * j0.Pinchoff)
	const n = 4000
	u := distuv.Uniform{Min: -math.Log(DefaultFETSpread), Max: math.Log(DefaultFETSpread)}
	x := make([]float64, n)
	for i := range x {
		cl := ch.Clone()
		draw(cl, pl, &opt, trialRand(7, i))
		j := findPart(cl, "boost", "Q1").JFETParams()
		if b := j.Idss / (j.Pinchoff * j.Pinchoff); math.Abs(b/beta-1) > 1e-12 {
			t.Fatalf("draw %d: β %g, written %g", i, b, beta)
		}
		x[i] = math.Log(j.Pinchoff / j0.Pinchoff)
		if math.Abs(x[i]) > u.Max {
			t.Fatalf("draw %d: Vp %g V outside ×/÷ %g of %g V", i, j.Pinchoff, DefaultFETSpread, j0.Pinchoff)
		}
	}
	sort.Float64s(x)
	for _, p := range []float64{0.05, 0.5, 0.95} {
		got, want := x[int(p*n)], u.Quantile(p)
		se := math.Sqrt(p*(1-p)/n) / u.Prob(want)
		if math.Abs(got-want) > 4*se {
			t.Errorf("p%.0f of ln(Vp/Vp0): %.4f, uniform %.4f ± %.4f", 100*p, got, want, 4*se)
		}
	}
}
