package models_test

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"

	"renderchain/models"
)

// Each parser against its definition. Tolerance 1e-12 relative: the
// parsers do one decimal conversion and at most one multiplication, so
// anything beyond a few ulps would be a wrong scale.
//
// Sources: dBV is dB re 1 V RMS and a sine's peak is √2 times its RMS
// (IEC 60027-3 level definition; the sine's crest factor in closed form);
// peak-to-peak is twice the peak of a sine; 0 °C = 273.15 K (SI
// Brochure, 9th ed., sec. 2.3.1); "5 %" is 0.05 (ISO 80000-1 per cent).
func TestQuantityParsers(t *testing.T) {
	cases := []struct {
		name  string
		parse func(string) (float64, error)
		text  string
		want  float64
	}{
		{"amplitude", models.ParseAmplitude, "100mV", 0.1},
		{"amplitude", models.ParseAmplitude, "0.1Vp", 0.1},
		{"amplitude", models.ParseAmplitude, "20mVpp", 0.01},
		{"amplitude", models.ParseAmplitude, "1Vrms", math.Sqrt2},
		{"amplitude", models.ParseAmplitude, "70.7mVrms", 0.0707 * math.Sqrt2},
		{"amplitude", models.ParseAmplitude, "0dBV", math.Sqrt2},
		{"amplitude", models.ParseAmplitude, "-20dBV", math.Sqrt2 / 10},
		{"frequency", models.ParseFrequency, "1kHz", 1000},
		{"frequency", models.ParseFrequency, "440", 440},
		{"temperature", models.ParseTemperature, "25", 298.15},
		{"temperature", models.ParseTemperature, "-10C", 263.15},
		{"temperature", models.ParseTemperature, "300K", 300},
		{"rotation", models.ParseRotation, "0.25", 0.25},
		{"rotation", models.ParseRotation, "1", 1},
		{"tolerance", models.ParseTolerance, "5%", 0.05},
		{"tolerance", models.ParseTolerance, "0.1", 0.1},
		{"decibels", models.ParseDecibels, "30dB", 30},
		{"decibels", models.ParseDecibels, "-3.5", -3.5},
		{"percent", models.ParsePercent, "20%", 20},
		{"seconds", models.ParseSeconds, "20ms", 0.02},
		{"seconds", models.ParseSeconds, "4s", 4},
		{"seconds", models.ParseSeconds, "2.5", 2.5},
		{"gain", models.ParseGain, "182", 182},
	}
	for _, c := range cases {
		got, err := c.parse(c.text)
		if err != nil {
			t.Errorf("%s %q: %v", c.name, c.text, err)
			continue
		}
		if math.Abs(got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("%s %q = %.15g, want %.15g", c.name, c.text, got, c.want)
		}
	}
}

// What no circuit can mean is refused, with one line that quotes the text
// and wraps ErrInvalid: not-a-number and infinities in every spelling the
// parsers could meet (strconv reads "NaN", "Inf" and overflowing exponents),
// out-of-range values, and malformed text.
func TestQuantityParsersRefuse(t *testing.T) {
	cases := []struct {
		name  string
		parse func(string) (float64, error)
		text  string
	}{
		{"amplitude", models.ParseAmplitude, "0"},
		{"amplitude", models.ParseAmplitude, "-1mV"},
		{"amplitude", models.ParseAmplitude, "NaN"},
		{"amplitude", models.ParseAmplitude, "inf dBV"},
		{"amplitude", models.ParseAmplitude, "1e400V"},
		{"amplitude", models.ParseAmplitude, "1kV"},
		{"amplitude", models.ParseAmplitude, "5 bananas"},
		{"frequency", models.ParseFrequency, "0"},
		{"frequency", models.ParseFrequency, "-1k"},
		{"frequency", models.ParseFrequency, "nan"},
		{"temperature", models.ParseTemperature, "200"},
		{"temperature", models.ParseTemperature, "inf"},
		{"rotation", models.ParseRotation, "nan"},
		{"rotation", models.ParseRotation, "1.01"},
		{"rotation", models.ParseRotation, "-0.1"},
		{"tolerance", models.ParseTolerance, "nan"},
		{"tolerance", models.ParseTolerance, "NaN%"},
		{"tolerance", models.ParseTolerance, "100%"},
		{"decibels", models.ParseDecibels, "+Inf dB"},
		{"percent", models.ParsePercent, "NaN%"},
		{"seconds", models.ParseSeconds, "-1s"},
		{"seconds", models.ParseSeconds, "1e999"},
		{"gain", models.ParseGain, "inf"},
		{"gain", models.ParseGain, "0"},
	}
	for _, c := range cases {
		v, err := c.parse(c.text)
		if err == nil {
			t.Errorf("%s %q accepted as %g", c.name, c.text, v)
			continue
		}
		msg := err.Error()
		if !errors.Is(err, models.ErrInvalid) || strings.ContainsAny(msg, "\n\r") {
			t.Errorf("%s %q: %q does not wrap ErrInvalid or spans lines", c.name, c.text, msg)
		}
	}
}

// The supply rule: the chain file's sign is the build's polarity; a
// supply given elsewhere sets the magnitude, and a written sign that
// contradicts the file is refused with the way to write it.
func TestParseSupplyKeepsPolarity(t *testing.T) {
	cases := []struct {
		text     string
		polarity float64
		want     float64
		bad      bool
	}{
		{"9", 9, 9, false},
		{"9.6V", -9, -9.6, false},
		{"7", -9, -7, false},
		{"-7V", -9, -7, false},
		{"+7V", -9, 0, true},
		{"-7V", 9, 0, true},
		{"+7V", 9, 7, false},
		{"-7V", 0, -7, false},
		{"0", 9, 0, true},
		{"61V", 9, 0, true},
		{"nan", -9, 0, true},
	}
	for _, c := range cases {
		got, err := models.ParseSupply(c.text, c.polarity)
		switch {
		case c.bad && err == nil:
			t.Errorf("ParseSupply(%q, %g) accepted as %g", c.text, c.polarity, got)
		case !c.bad && (err != nil || got != c.want):
			t.Errorf("ParseSupply(%q, %g) = %g, %v; want %g", c.text, c.polarity, got, err, c.want)
		}
	}
	_, err := models.ParseSupply("+9V", -9)
	var pe *models.PolarityError
	if !errors.As(err, &pe) || !strings.Contains(err.Error(), `write 9V or -9V`) {
		t.Errorf("contradicting sign: %v", err)
	}
	list, err := models.ParseSupplies("9.6,9,8,7", -9)
	if err != nil || len(list) != 4 || list[0] != -9.6 || list[3] != -7 {
		t.Errorf("list %v, %v", list, err)
	}
}

func TestParseSpanAndLists(t *testing.T) {
	lo, hi, err := models.ParseSpan("1mV..1V", models.ParseAmplitude, false)
	if err != nil || lo != 1e-3 || hi != 1 {
		t.Errorf("1mV..1V: %g %g %v", lo, hi, err)
	}
	lo, hi, err = models.ParseSpan("..20%", models.ParsePercent, true)
	if err != nil || !math.IsInf(lo, -1) || hi != 20 {
		t.Errorf("..20%%: %g %g %v", lo, hi, err)
	}
	for _, bad := range []string{"1V..1mV", "1V", "..1V", "1V..1V"} {
		if _, _, err := models.ParseSpan(bad, models.ParseAmplitude, false); err == nil {
			t.Errorf("span %q accepted", bad)
		}
	}
	if _, _, err := models.ParseSpan("..", models.ParsePercent, true); err == nil {
		t.Error("open span without bounds accepted")
	}
	if _, err := models.ParseList("1,,2"); err == nil {
		t.Error("empty list item accepted")
	}
	if n, err := models.ParseWhole("8", models.OversampleRange); err != nil || n != 8 {
		t.Errorf("whole 8: %d %v", n, err)
	}
	if _, err := models.ParseWhole("32", models.OversampleRange); err == nil {
		t.Error("oversample 32 accepted")
	}
}

// Library errors name the option field and keep the reason.
func TestFieldError(t *testing.T) {
	_, perr := models.ParseRotation("1.5")
	err := models.FieldOf("sweep_knob", "1.5", perr)
	var fe *models.FieldError
	if !errors.As(err, &fe) || fe.Field != "sweep_knob" || !errors.Is(err, models.ErrInvalid) {
		t.Fatalf("%#v", err)
	}
	if got := err.Error(); got != `sweep_knob "1.5": outside 0…1` {
		t.Errorf("message %q", got)
	}
	if got := models.SupplyRange.Describe(); got != "above 0 V and at most 60 V" {
		t.Errorf("supply range %q", got)
	}
	if got := models.TemperatureRange.Describe(); got != "−60…150 °C" {
		t.Errorf("temperature range %q", got)
	}
}

func TestParseAmplitudeForms(t *testing.T) {
	tests := []struct {
		text string
		want float64 // volts peak
	}{
		{"100mV", 0.1},
		{"0.1", 0.1},
		{"0.1V", 0.1},
		{"100mVp", 0.1},
		{"20mVpp", 0.01}, // peak-to-peak is twice the peak (definition)
		{"2Vpp", 1},
		// dBV is dB re 1 V RMS (common practice); a sine's peak is √2 × RMS.
		{"0dBV", math.Sqrt2},
		{"-20dBV", math.Sqrt2 * 0.1},
		{" -6.0206 dBV ", math.Sqrt2 * 0.5},
		{"1Vrms", math.Sqrt2},
		{"70.71mVrms", 0.07071 * math.Sqrt2},
	}
	for _, tc := range tests {
		got, err := models.ParseAmplitude(tc.text)
		if err != nil {
			t.Errorf("models.ParseAmplitude(%q): %v", tc.text, err)
			continue
		}
		// Tolerance: a few ulps of the arithmetic; -6.0206 dB is 0.5 to 5 digits.
		tol := 1e-12
		if strings.Contains(tc.text, "6.0206") {
			tol = 1e-5
		}
		if math.Abs(got-tc.want) > tol*tc.want {
			t.Errorf("models.ParseAmplitude(%q) = %.12g V, want %.12g V", tc.text, got, tc.want)
		}
	}
}

func TestParseAmplitudeErrors(t *testing.T) {
	for _, text := range []string{"0", "-1mV", "0mVpp", "abc", "10dBX", "dBV", "1A", "", "1e400"} {
		_, err := models.ParseAmplitude(text)
		if !errors.Is(err, models.ErrInvalid) {
			t.Errorf("models.ParseAmplitude(%q) = %v, want an error wrapping ErrInvalid", text, err)
			continue
		}
		if msg := err.Error(); strings.Contains(msg, "\n") || !strings.Contains(msg, "amplitude") || (text != "" && !strings.Contains(msg, `"`+text+`"`)) {
			t.Errorf("models.ParseAmplitude(%q): message %q should be one line naming the amplitude and the value", text, msg)
		}
	}
}

func TestParseFrequencyForms(t *testing.T) {
	tests := []struct {
		text string
		want float64
		ok   bool
	}{
		{"1k", 1000, true}, {"1kHz", 1000, true}, {"440", 440, true}, {"2.5kHz", 2500, true},
		{"0", 0, false}, {"-5", 0, false}, {"1kV", 0, false}, {"fast", 0, false},
	}
	for _, tc := range tests {
		got, err := models.ParseFrequency(tc.text)
		if (err == nil) != tc.ok || (tc.ok && got != tc.want) {
			t.Errorf("models.ParseFrequency(%q) = %g, %v; want %g, ok %v", tc.text, got, err, tc.want, tc.ok)
		}
	}
	fs, err := models.ParseFrequencies("100, 1k,10k")
	if err != nil || !slices.Equal(fs, []float64{100, 1000, 10000}) {
		t.Errorf("ParseFrequencies = %v, %v", fs, err)
	}
	if _, err := models.ParseFrequencies("100,,1k"); err == nil {
		t.Error("ParseFrequencies with an empty item: want an error")
	}
}
