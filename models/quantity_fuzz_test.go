package models_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"renderchain/models"
)

// FuzzQuantityParsers feeds any text to every quantity parser: none may
// panic; a value it accepts is finite and inside the parser's range; a
// refusal wraps models.ErrInvalid and is one line. The seeds are the forms
// the parsers document and the non-finite spellings Go's strconv reads.
func FuzzQuantityParsers(f *testing.F) {
	for _, s := range []string{"100mV", "20mVpp", "70.7mVrms", "-20dBV", "1kHz", "9.6", "-9V", "+9V", "25C", "298.15K",
		"0.5", "5%", "30dB", "20ms", "4s", "215", "nan", "NaN", "inf", "-Inf", "1e400", "", " ", "1..2", "9,8,7", "0x1p3", "½"} {
		f.Add(s)
	}
	type parser struct {
		name  string
		parse func(string) (float64, error)
		r     models.Range
	}
	ps := []parser{
		{"amplitude", models.ParseAmplitude, models.SignalRange},
		{"frequency", models.ParseFrequency, models.FrequencyRange},
		{"temperature", models.ParseTemperature, models.TemperatureRange},
		{"rotation", models.ParseRotation, models.RotationRange},
		{"tolerance", models.ParseTolerance, models.ToleranceRange},
		{"seconds", models.ParseSeconds, models.DurationRange},
		{"gain", models.ParseGain, models.GainRange},
		{"supply", func(s string) (float64, error) { return models.ParseSupply(s, -9) }, models.Range{Lo: -60, Hi: 0, HiOpen: true}},
		{"decibels", models.ParseDecibels, models.Range{Lo: math.Inf(-1), Hi: math.Inf(1)}},
		{"percent", models.ParsePercent, models.Range{Lo: math.Inf(-1), Hi: math.Inf(1)}},
	}
	f.Fuzz(func(t *testing.T, s string) {
		for _, p := range ps {
			v, err := p.parse(s)
			if err != nil {
				if !errors.Is(err, models.ErrInvalid) || strings.ContainsAny(err.Error(), "\n\r") {
					t.Fatalf("%s(%q): %q", p.name, s, err)
				}
				continue
			}
			if math.IsNaN(v) || math.IsInf(v, 0) || !p.r.Contains(v) && !(math.IsInf(p.r.Lo, -1) && math.IsInf(p.r.Hi, 1)) {
				t.Fatalf("%s(%q) accepted %g, outside %s", p.name, s, v, p.r.Describe())
			}
		}
		if list, err := models.ParseSupplies(s, 9); err == nil {
			for _, v := range list {
				if !(v > 0 && v <= 60) {
					t.Fatalf("ParseSupplies(%q, 9) gave %g", s, v)
				}
			}
		}
	})
}
