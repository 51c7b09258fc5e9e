package bench

import (
	"math"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/dsp/spectrum"
	"renderchain/engine"
	"renderchain/models"
)

// GainAt returns the small-signal gain, dB, from the chain's source to its
// output at freq Hz, linearised at the operating point (mna.AC).
func GainAt(c *models.Circuit, dc *mna.OperatingPoint, freq float64) (float64, error) {
	h, err := mna.AC(c, dc, []float64{freq}, []int{c.Output})
	if err != nil {
		return math.NaN(), err
	}
	return spectrum.DB(cmplxAbs(h[0][0])), nil
}

func cmplxAbs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }

// THD settings: the base rate of the rendering channel, the settling time
// before the record and the record's length.
const (
	thdRate   = 48000.0
	thdSettle = 0.2  // s
	thdRecord = 0.05 // s
)

// THDAt renders a sine of amp volts peak at the source and freq Hz through
// the chain's oversampled rendering channel (render.Engine.NewChannel) and
// returns THD_F of the settled output (spectrum.Analyze), a fraction.
func THDAt(ch *chains.Chain, c *models.Circuit, dc *mna.OperatingPoint, freq, amp float64) (float64, error) {
	os, err := engine.Oversample(ch, 0)
	if err != nil {
		return math.NaN(), err
	}
	eng := &engine.Prepared{Chain: ch, Circuit: c, DC: dc, Oversample: os}
	chn, err := eng.NewChannel(thdRate)
	if err != nil {
		return math.NaN(), err
	}
	settle := int(thdSettle * thdRate)
	cycles := math.Max(1, math.Round(thdRecord*freq))
	record := int(math.Round(cycles * thdRate / freq))
	total := settle + record
	rec := make([]float64, 0, record)
	src := make([]float64, engine.MaxBlock)
	dst := make([]float64, engine.MaxBlock)
	a := amp / ch.InputPeak
	w := 2 * math.Pi * freq / thdRate
	fade := 0.01 * thdRate
	produced := 0
	keep := func(out []float64) {
		for _, v := range out {
			if produced >= settle && len(rec) < record {
				rec = append(rec, v)
			}
			produced++
		}
	}
	for start := 0; start < total; start += len(src) {
		m := min(len(src), total-start)
		for i := 0; i < m; i++ {
			k := float64(start + i)
			g := 1.0
			if k < fade {
				g = 0.5 - 0.5*math.Cos(math.Pi*k/fade)
			}
			src[i] = g * a * math.Sin(w*k)
		}
		keep(dst[:chn.Process(dst, src[:m])])
	}
	for n := chn.Flush(dst); n > 0; n = chn.Flush(dst) {
		keep(dst[:n])
	}
	an, err := spectrum.Analyze(rec, thdRate, freq, nil)
	if err != nil {
		return math.NaN(), err
	}
	return an.THDF, nil
}
