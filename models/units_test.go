package models_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"renderchain/models"
)

// TestParseValueAccepts checks the engineering notation of ParseValue
// against the definitions it cites: the SI prefixes of the BIPM SI
// Brochure (9th ed., table 7), the letter-as-decimal-point resistor and
// capacitor codes of IEC 60062 (4k7 = 4.7 k, 2n2 = 2.2 n, 4R7 = 4.7 Ω,
// 2M2 = 2.2 M, 100R = 100 Ω), and the celsius-to-kelvin offset 273.15 K
// (SI Brochure, sec. 2.3.1).
//
// Tolerance: 1e-12 relative (absolute for zero). The parser builds a
// decimal string and calls strconv.ParseFloat, then multiplies by one power
// of ten, so the result is within an ulp or two of the exact decimal value;
// 1e-12 leaves that room and nothing that a wrong prefix (a factor of 1000)
// or a dropped digit could hide in.
func TestParseValueAccepts(t *testing.T) {
	const tol = 1e-12
	cases := []struct {
		text string
		q    models.Quantity
		want float64
		src  string
	}{
		// Plain numbers are SI units.
		{"22000", models.Resistance, 22000, "plain number"},
		{"22e3", models.Resistance, 22000, "exponent"},
		{"1.5E-3A", models.Current, 1.5e-3, "exponent and unit"},
		{"0.5", models.Dimensionless, 0.5, "plain number"},
		{"  4k7  ", models.Resistance, 4700, "surrounding space"},
		// SI prefixes (SI Brochure table 7).
		{"22k", models.Resistance, 22e3, "SI kilo"},
		{"10K", models.Resistance, 10e3, "K for kilo on a resistance (common practice)"},
		{"1M", models.Resistance, 1e6, "SI mega: M"},
		{"1m", models.Resistance, 1e-3, "SI milli: m"},
		{"1MΩ", models.Resistance, 1e6, "M is mega with a unit"},
		{"1mΩ", models.Resistance, 1e-3, "m is milli with a unit"},
		{"2.2MHz", models.Frequency, 2.2e6, "MHz"},
		{"2.2mHz", models.Frequency, 2.2e-3, "mHz"},
		{"1G", models.Resistance, 1e9, "SI giga"},
		{"100n", models.Capacitance, 100e-9, "SI nano"},
		{"22p", models.Capacitance, 22e-12, "SI pico"},
		{"3f", models.Capacitance, 3e-15, "SI femto (f, not farad)"},
		{"10fA", models.Current, 10e-15, "femto with a unit"},
		{"4.7µF", models.Capacitance, 4.7e-6, "micro sign U+00B5"},
		{"4.7μF", models.Capacitance, 4.7e-6, "Greek mu U+03BC"},
		{"4.7uF", models.Capacitance, 4.7e-6, "u for micro (common practice)"},
		// IEC 60062 letter-as-decimal-point codes.
		{"4k7", models.Resistance, 4.7e3, "IEC 60062"},
		{"2n2", models.Capacitance, 2.2e-9, "IEC 60062"},
		{"4R7", models.Resistance, 4.7, "IEC 60062: R as the decimal point"},
		{"2M2", models.Resistance, 2.2e6, "IEC 60062"},
		{"100R", models.Resistance, 100, "IEC 60062: R as the unit"},
		{"1R0", models.Resistance, 1, "IEC 60062"},
		{"4u7", models.Capacitance, 4.7e-6, "IEC 60062 with u"},
		{"4µ7", models.Capacitance, 4.7e-6, "IEC 60062 with µ (two-byte rune)"},
		{"2n2F", models.Capacitance, 2.2e-9, "IEC 60062 code followed by the unit"},
		{"4k7 Ω", models.Resistance, 4.7e3, "IEC 60062 code, space, unit"},
		{"100 R", models.Resistance, 100, "R as the unit after a space"},
		// Units.
		{"22kΩ", models.Resistance, 22e3, "unit Ω (U+03A9)"},
		{"22 kohm", models.Resistance, 22e3, "unit ohm"},
		{"470ohms", models.Resistance, 470, "unit ohms"},
		{"470 Ohm", models.Resistance, 470, "unit Ohm"},
		{"1F", models.Capacitance, 1, "unit F"},
		{"100mH", models.Inductance, 0.1, "unit H"},
		{"9V", models.Voltage, 9, "unit V"},
		{"6V3", models.Voltage, 6.3, "V as the decimal mark, as capacitor markings write it (common practice)"},
		{"4V7", models.Voltage, 4.7, "V as the decimal mark, as zener markings write it (common practice)"},
		{"-6V3", models.Voltage, -6.3, "signed, V as the decimal mark"},
		{"300mV", models.Voltage, 0.3, "unit V with milli"},
		{"2mA", models.Current, 2e-3, "unit A"},
		{"1kHz", models.Frequency, 1e3, "unit Hz"},
		{"1m", models.Length, 1, "m alone on a length is the metre"},
		{"1mm", models.Length, 1e-3, "mm is milli-metre"},
		{"5km", models.Length, 5e3, "km"},
		// Signs.
		{"-9V", models.Voltage, -9, "negative supply"},
		{"+5V", models.Voltage, 5, "explicit plus"},
		{"-300mV", models.Voltage, -0.3, "negative with prefix"},
		{"-2e-3", models.Current, -2e-3, "negative exponent form"},
		// Temperatures (kelvin = celsius + 273.15, SI Brochure sec. 2.3.1).
		{"25C", models.Temperature, 298.15, "celsius"},
		{"25°C", models.Temperature, 298.15, "degree celsius"},
		{"25 °C", models.Temperature, 298.15, "degree celsius, space"},
		{"298.15K", models.Temperature, 298.15, "kelvin"},
		{"25", models.Temperature, 298.15, "bare number is celsius (documented)"},
		{"-40C", models.Temperature, 233.15, "negative celsius"},
		{"100C", models.Temperature, 373.15, "boiling point of water at 1 atm (common practice)"},
		{"0K", models.Temperature, 0, "absolute zero"},
		{"10K", models.Temperature, 10, "K is kelvin, not kilo, on a temperature"},
	}
	for _, c := range cases {
		got, err := models.ParseValue(c.text, c.q)
		if err != nil {
			t.Errorf("ParseValue(%q, %v) [%s]: %v", c.text, c.q, c.src, err)
			continue
		}
		if e := relErr(got, c.want); e > tol {
			t.Errorf("ParseValue(%q, %v) [%s] = %.17g, want %.17g (rel err %.2g > %g)", c.text, c.q, c.src, got, c.want, e, tol)
		}
	}
}

// TestParseValueRejects checks that malformed text and units of another
// quantity give a *ValueError naming the text and the quantity, on one line.
func TestParseValueRejects(t *testing.T) {
	cases := []struct {
		text   string
		q      models.Quantity
		reason string // a word the reason must hold
	}{
		{"22kk", models.Resistance, "prefix"},
		{"6V3V", models.Voltage, "after V"},
		{"6V3", models.Resistance, "unit"},
		{"4k7k", models.Resistance, "prefix"},
		{"abc", models.Resistance, "no number"},
		{"", models.Resistance, "empty"},
		{"   ", models.Resistance, "empty"},
		{"1..2", models.Resistance, "malformed"},
		{".", models.Resistance, "malformed"},
		{"22nF", models.Resistance, `"F"`},      // a capacitance is not a resistance
		{"4k7Ω", models.Capacitance, `"Ω"`},     // a resistance is not a capacitance
		{"100R", models.Capacitance, `"R"`},     // R is a resistance code only
		{"9V", models.Current, `"V"`},           // a voltage is not a current
		{"25F", models.Temperature, `"F"`},      // no Fahrenheit
		{"1Hz", models.Inductance, `"Hz"`},      // H is not the start of Hz here
		{"4.7k7", models.Resistance, "decimal"}, // IEC code after a decimal point
		{"4R7Ω", models.Resistance, "after R"},
		{"1e400", models.Resistance, "malformed"}, // out of float64 range
		{"12 34", models.Resistance, `"34"`},
		{"2e", models.Resistance, `"e"`},
		{"k", models.Resistance, "no number"},
		{"-", models.Voltage, "no number"},
	}
	for _, c := range cases {
		v, err := models.ParseValue(c.text, c.q)
		if err == nil {
			t.Errorf("ParseValue(%q, %v) = %g, want an error", c.text, c.q, v)
			continue
		}
		var ve *models.ValueError
		if !errors.As(err, &ve) {
			t.Errorf("ParseValue(%q): error %T, want *models.ValueError", c.text, err)
			continue
		}
		if ve.Text != c.text || ve.Quantity != c.q {
			t.Errorf("ParseValue(%q, %v): error names %q, %v", c.text, c.q, ve.Text, ve.Quantity)
		}
		msg := err.Error()
		if !strings.Contains(msg, c.q.String()) || !strings.Contains(msg, c.reason) {
			t.Errorf("ParseValue(%q, %v): message %q lacks %q or %q", c.text, c.q, msg, c.q.String(), c.reason)
		}
		oneLine(t, err)
	}
}

// TestParseValueOhmSign: the Unicode Standard makes U+2126 OHM SIGN
// canonically equivalent to U+03A9 GREEK CAPITAL LETTER OMEGA (its
// canonical decomposition; conformance clause C6 says a process shall not
// treat canonically equivalent sequences as different). Datasheets and
// character pickers produce both, so "4k7Ω" with either must parse.
func TestParseValueOhmSign(t *testing.T) {
	const text = "4k7\u2126"
	v, err := models.ParseValue(text, models.Resistance)
	if err != nil {
		t.Fatal("U+2126 OHM SIGN is not accepted as the ohm unit: ", err)
	}
	if relErr(v, 4700) > 1e-12 {
		t.Errorf("ParseValue(%q) = %g, want 4700", text, v)
	}
}

// TestFormatValue checks engineering notation with SI prefixes (SI
// Brochure table 7) and four significant digits, as documented.
// Comparison is exact on the string.
func TestFormatValue(t *testing.T) {
	cases := []struct {
		v    float64
		unit string
		want string
	}{
		{4700, "Ω", "4.7 kΩ"},
		{47e3, "Ω", "47 kΩ"},
		{1e6, "Ω", "1 MΩ"},
		{2.2e-9, "F", "2.2 nF"},
		{1e-6, "F", "1 µF"},
		{22e-12, "F", "22 pF"},
		{1.5e9, "Hz", "1.5 GHz"},
		{-0.0033, "V", "-3.3 mV"},
		{9, "V", "9 V"},
		{0, "V", "0 V"},
		{25.6926e-3, "V", "25.69 mV"}, // four significant digits
		{999.99, "Ω", "1 kΩ"},         // rounds up across the prefix boundary
		{999.9, "Ω", "999.9 Ω"},
		{999960, "Ω", "1 MΩ"},
		{999940, "Ω", "999.9 kΩ"},
		{-999.99, "Ω", "-1 kΩ"},
		{1e-15, "A", "1 fA"},
		{10e-3, "", "10 m"},
	}
	for _, c := range cases {
		if got := models.FormatValue(c.v, c.unit); got != c.want {
			t.Errorf("FormatValue(%g, %q) = %q, want %q", c.v, c.unit, got, c.want)
		}
	}
}

// TestFormatParseRoundTrip: FormatValue's text parses back with ParseValue
// to the value rounded to four significant digits. Tolerance 5e-4 relative:
// half a unit in the fourth significant digit of a mantissa in [1, 1000)
// is at most 0.5e-3 of it. Values are log-uniform over 1 fA … 1 TΩ with a
// fixed seed.
func TestFormatParseRoundTrip(t *testing.T) {
	const tol = 5e-4
	rng := rand.New(rand.NewPCG(1, 2))
	type unit struct {
		sym string
		q   models.Quantity
	}
	units := []unit{{"Ω", models.Resistance}, {"F", models.Capacitance}, {"H", models.Inductance},
		{"V", models.Voltage}, {"A", models.Current}, {"Hz", models.Frequency}}
	worst := 0.0
	for k := 0; k < 2000; k++ {
		u := units[k%len(units)]
		v := math.Pow(10, -15+27*rng.Float64())
		if rng.IntN(2) == 0 && (u.q == models.Voltage || u.q == models.Current) {
			v = -v
		}
		s := models.FormatValue(v, u.sym)
		got, err := models.ParseValue(s, u.q)
		if err != nil {
			t.Fatalf("FormatValue(%g, %q) = %q does not parse: %v", v, u.sym, s, err)
		}
		e := relErr(got, v)
		worst = math.Max(worst, e)
		if e > tol {
			t.Errorf("round trip %g → %q → %g (rel err %.2g > %g)", v, s, got, e, tol)
		}
	}
	t.Logf("worst round-trip error %.3g (bound %g)", worst, tol)
}

// TestFormatValueTiny: a saturation current of a wide-gap junction can be
// far below a femtoampere (blue and white LEDs' fitted Is lie around
// 1e-20 A and below: common practice). FormatValue must not print such a
// nonzero value as zero; it must still parse back to four digits.
func TestFormatValueTiny(t *testing.T) {
	for _, v := range []float64{2e-20, 3.3e-25} {
		s := models.FormatValue(v, "A")
		got, err := models.ParseValue(s, models.Current)
		if err != nil || relErr(got, v) > 5e-4 {
			t.Errorf("FormatValue(%g, \"A\") = %q, which reads back as %g (%v)", v, s, got, err)
		}
	}
}
