package models

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Quantity names the physical quantity a value string must denote. It picks
// the unit symbols that are accepted and the wording of errors.
type Quantity int

// The quantities a chain file can hold.
const (
	Dimensionless Quantity = iota
	Resistance
	Capacitance
	Inductance
	Voltage
	Current
	Temperature // parsed to kelvin; "25C", "25°C", "298.15K"
	Frequency
	Length
	Time      // seconds; "4s", "20ms"
	Amplitude // volts peak of a test sine; ParseAmplitude
	Rotation  // a knob's rotation, 0…1
	Fraction  // a tolerance or share: 0.05 or "5%"
	Decibels  // a level or gain in dB
	Percent   // a percentage: "20%" or 20
)

var quantityNames = [...]string{
	Dimensionless: "number",
	Resistance:    "resistance",
	Capacitance:   "capacitance",
	Inductance:    "inductance",
	Voltage:       "voltage",
	Current:       "current",
	Temperature:   "temperature",
	Frequency:     "frequency",
	Length:        "length",
	Time:          "time",
	Amplitude:     "amplitude",
	Rotation:      "rotation",
	Fraction:      "fraction",
	Decibels:      "level in dB",
	Percent:       "percentage",
}

func (q Quantity) String() string {
	if int(q) < len(quantityNames) {
		return quantityNames[q]
	}
	return "quantity"
}

// article returns "a" or "an" for the quantity's name.
func (q Quantity) article() string {
	if strings.ContainsRune("aeiou", rune(q.String()[0])) {
		return "an"
	}
	return "a"
}

// units lists, per quantity, the unit spellings accepted after the number
// and prefix. Matching is exact (case matters: "F" farad, "f" femto).
var units = map[Quantity][]string{
	Resistance:  {"Ω", "\u2126", "ohm", "ohms", "Ohm", "R"}, // U+2126 OHM SIGN is canonically Ω
	Capacitance: {"F"},
	Inductance:  {"H"},
	Voltage:     {"V"},
	Current:     {"A"},
	Temperature: {"°C", "C", "K"},
	Frequency:   {"Hz"},
	Length:      {"m"},
	Time:        {"s"},
}

// prefixes are the SI prefixes (BIPM SI Brochure, 9th ed., table 7) that a
// value may carry. "M" is mega and "m" is milli; "u" stands for micro.
var prefixes = map[rune]float64{
	'f': 1e-15, 'p': 1e-12, 'n': 1e-9, 'u': 1e-6, 'µ': 1e-6, 'μ': 1e-6,
	'm': 1e-3, 'k': 1e3, 'K': 1e3, 'M': 1e6, 'G': 1e9,
}

var prefixExponent = map[float64]int{1e-15: -15, 1e-12: -12, 1e-9: -9, 1e-6: -6, 1e-3: -3, 1e3: 3, 1e6: 6, 1e9: 9}

// ValueError reports a value string that does not denote the wanted quantity.
type ValueError struct {
	Text     string
	Quantity Quantity
	Reason   string
}

// Error quotes the value (at most errShown characters, the rest elided
// with its size) and the reason (at most errShown+20), so that a huge
// value (a megabyte on the command line or in a file) gives a short line.
func (e *ValueError) Error() string {
	msg := fmt.Sprintf("value %s is not %s %s", quoteShort(e.Text), e.Quantity.article(), e.Quantity)
	if e.Reason != "" {
		r := e.Reason
		if c := cutRunes(r, errShown+20); len(c) < len(r) {
			r = c + "…"
		}
		msg += " (" + r + ")"
	}
	return msg
}

// errShown is how many characters of a value an error quotes.
const errShown = 40

// quoteShort quotes s, cut to errShown characters with its length noted.
func quoteShort(s string) string {
	c := cutRunes(s, errShown)
	if len(c) == len(s) {
		return strconv.Quote(s)
	}
	return strconv.Quote(c) + fmt.Sprintf("… (%d bytes)", len(s))
}

// cutRunes returns the first n characters of s (all of s if shorter).
func cutRunes(s string, n int) string {
	for i := range s {
		if n == 0 {
			return s[:i]
		}
		n--
	}
	return s
}

// ParseValue reads a value written in engineering notation and returns it in
// SI units (temperatures in kelvin). Accepted forms:
//
//	22000  22e3  22k  22kΩ  22 kohm   SI prefix, optional unit
//	4k7  2n2  2M2  4R7  100R          IEC 60062 letter-as-decimal-point codes
//	6V3  4V7                          a voltage's unit as the decimal mark (markings)
//	-9V  300mV  25C  25°C  298.15K    signed values and units
//
// Plain numbers are SI units. A unit that belongs to another quantity, a
// doubled prefix ("22kk") or trailing text is an error.
func ParseValue(text string, q Quantity) (float64, error) {
	s := strings.TrimSpace(text)
	bad := func(reason string) (float64, error) {
		return 0, &ValueError{Text: text, Quantity: q, Reason: reason}
	}
	if s == "" {
		return bad("empty")
	}
	// Leading number: sign, digits, optional fraction and exponent.
	i := 0
	if s[0] == '+' || s[0] == '-' {
		i++
	}
	digitsStart := i
	for i < len(s) && (s[i] >= '0' && s[i] <= '9' || s[i] == '.') {
		i++
	}
	if i == digitsStart {
		return bad("no number")
	}
	// Exponent only when followed by a digit or sign+digit, so "2e" is not eaten.
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		if j < len(s) && s[j] >= '0' && s[j] <= '9' {
			for j < len(s) && s[j] >= '0' && s[j] <= '9' {
				j++
			}
			i = j
		}
	}
	num := s[:i]
	rest := strings.TrimLeftFunc(s[i:], unicode.IsSpace)
	scale := 1.0
	// Prefix, possibly used as the decimal point (IEC 60062): 4k7, 2n2, 4R7.
	if rest != "" {
		r, size := utf8.DecodeRuneInString(rest)
		p, isPrefix := prefixes[r]
		if q == Temperature && (r == 'K' || r == 'C') {
			isPrefix = false // "K" is kelvin and "C" is celsius here
		}
		if r == 'R' && q == Resistance {
			p, isPrefix = 1, true
		}
		// "6V3", "4V7": a voltage's unit letter as the decimal mark, as
		// capacitor and zener markings write it (common practice); a V
		// that no digit follows stays the unit ("9V").
		if r == 'V' && q == Voltage && len(rest) > 1 && rest[1] >= '0' && rest[1] <= '9' {
			p, isPrefix = 1, true
		}
		// "m" alone after a length is the metre, not milli.
		if q == Length && r == 'm' && len(rest) == 1 {
			isPrefix = false
		}
		if isPrefix {
			after := rest[size:]
			k := 0
			for k < len(after) && after[k] >= '0' && after[k] <= '9' {
				k++
			}
			if k > 0 {
				if strings.Contains(num, ".") || strings.ContainsAny(num, "eE") {
					return bad("letter-as-decimal code after a decimal point")
				}
				num += "." + after[:k]
			}
			if r == 'R' && k == 0 && after != "" {
				return bad("unexpected text after R")
			}
			scale = p
			rest = strings.TrimLeftFunc(after[k:], unicode.IsSpace)
			if r == 'R' || r == 'V' && q == Voltage {
				rest = "" // R (V) is both the decimal mark and the unit
				if after[k:] != "" {
					return bad("unexpected text after " + string(r))
				}
			}
		}
	}
	// Apply a power-of-ten prefix inside the decimal string, so "2n2" rounds
	// once (to the double nearest 2.2e-9) rather than twice.
	if exp, ok := prefixExponent[scale]; ok && scale != 1 && !strings.ContainsAny(num, "eE") {
		num += "e" + strconv.Itoa(exp)
		scale = 1
	}
	v, err := strconv.ParseFloat(num, 64)
	if err != nil {
		return bad("malformed number")
	}
	if rest != "" && !matchUnit(rest, q) {
		if _, isPrefix := prefixes[[]rune(rest)[0]]; isPrefix {
			return bad("more than one prefix or an unknown unit")
		}
		return bad(fmt.Sprintf("unit %q", rest))
	}
	v *= scale
	if q == Temperature && !strings.HasSuffix(rest, "K") {
		v += 273.15 // celsius (default for a bare number, as written in a chain file)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return bad("not finite")
	}
	return v, nil
}

func matchUnit(u string, q Quantity) bool {
	for _, s := range units[q] {
		if u == s {
			return true
		}
	}
	return false
}

// FormatValue writes v in engineering notation with up to four significant
// digits and the unit symbol, e.g. FormatValue(4700, "Ω") = "4.7 kΩ".
func FormatValue(v float64, unit string) string {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return strings.TrimSpace(strconv.FormatFloat(v, 'g', 4, 64) + " " + unit)
	}
	type pf struct {
		p string
		s float64
	}
	table := []pf{{"G", 1e9}, {"M", 1e6}, {"k", 1e3}, {"", 1}, {"m", 1e-3}, {"µ", 1e-6}, {"n", 1e-9}, {"p", 1e-12}, {"f", 1e-15}}
	a := math.Abs(v)
	chosen := table[len(table)-1]
	for _, t := range table {
		if a >= t.s*0.99995 {
			chosen = t
			break
		}
	}
	num := strconv.FormatFloat(v/chosen.s, 'g', 4, 64)
	if strings.ContainsAny(num, "e") {
		// Outside the prefixes' range: plain scientific notation.
		return strconv.FormatFloat(v, 'g', 4, 64) + " " + unit
	}
	return num + " " + chosen.p + unit
}
