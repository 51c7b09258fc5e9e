package measure

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"

	"renderchain/models"
)

// InputError reports a bad value given to the bench: which setting, the
// text or number given, and why. Its message is one line.
type InputError struct {
	What  string // the setting, e.g. "amplitude" or "--sweep-level"
	Value string // the value as given
	Msg   string
}

func (e *InputError) Error() string {
	if e.Value == "" {
		return e.What + ": " + e.Msg
	}
	return fmt.Sprintf("%s %q: %s", e.What, e.Value, e.Msg)
}

func inputErr(what, value, format string, a ...any) *InputError {
	return &InputError{What: what, Value: value, Msg: fmt.Sprintf(format, a...)}
}

// MinFrequency is the lowest test frequency the bench accepts, in Hz.
const MinFrequency = 5.0

// ParseFrequency reads a frequency such as "1k", "1kHz" or "440" (Hz).
func ParseFrequency(text string) (float64, error) {
	f, err := models.ParseValue(strings.TrimSpace(text), models.Frequency)
	if err != nil {
		return 0, &InputError{What: "frequency", Value: text, Msg: reason(err)}
	}
	if !(f > 0) || math.IsInf(f, 0) {
		return 0, inputErr("frequency", text, "must be a positive number of hertz")
	}
	return f, nil
}

// ParseAmplitude reads a test-signal amplitude and returns it in volts
// peak. Accepted forms:
//
//	0.1  100mV  0.1V  100mVp  0.1Vp     volts peak
//	20mVpp  1Vpp                        peak-to-peak (halved)
//	70.7mVrms  1Vrms                    RMS of a sine (× √2)
//	-20dBV  0dBV                        dB re 1 V RMS (sine: peak = √2·10^(x/20))
//
// The amplitude must be above zero.
func ParseAmplitude(text string) (float64, error) {
	s := strings.TrimSpace(text)
	low := strings.ToLower(s)
	var v float64
	switch {
	case strings.HasSuffix(low, "dbv"):
		db, err := strconv.ParseFloat(strings.TrimSpace(s[:len(s)-3]), 64)
		if err != nil || math.IsNaN(db) || math.IsInf(db, 0) {
			return 0, inputErr("amplitude", text, "want a level like -20dBV")
		}
		v = math.Sqrt2 * math.Pow(10, db/20)
	case strings.HasSuffix(low, "vpp"):
		x, err := parseVolts(s[:len(s)-2], text)
		if err != nil {
			return 0, err
		}
		v = x / 2
	case strings.HasSuffix(low, "vrms"):
		x, err := parseVolts(s[:len(s)-3], text)
		if err != nil {
			return 0, err
		}
		v = x * math.Sqrt2
	case strings.HasSuffix(low, "vp"):
		x, err := parseVolts(s[:len(s)-1], text)
		if err != nil {
			return 0, err
		}
		v = x
	default:
		x, err := parseVolts(s, text)
		if err != nil {
			return 0, err
		}
		v = x
	}
	if !(v > 0) || math.IsInf(v, 0) {
		return 0, inputErr("amplitude", text, "must be above 0 V")
	}
	return v, nil
}

func parseVolts(s, text string) (float64, error) {
	v, err := models.ParseValue(strings.TrimSpace(s), models.Voltage)
	if err != nil {
		return 0, &InputError{What: "amplitude", Value: text, Msg: reason(err)}
	}
	return v, nil
}

// reason extracts the why of a value error for our own message.
func reason(err error) string {
	if ve, ok := err.(*models.ValueError); ok && ve.Reason != "" {
		return ve.Reason
	}
	return err.Error()
}

// ParseList splits a comma-separated list, trimming blanks; an empty item
// is an error naming the list.
func ParseList(what, text string) ([]string, error) {
	var out []string
	for _, item := range strings.Split(text, ",") {
		item = strings.TrimSpace(item)
		if item == "" {
			return nil, inputErr(what, text, "has an empty item")
		}
		out = append(out, item)
	}
	return out, nil
}

// ParseFrequencies reads a comma-separated list of frequencies.
func ParseFrequencies(text string) ([]float64, error) {
	items, err := ParseList("--freqs", text)
	if err != nil {
		return nil, err
	}
	out := make([]float64, len(items))
	for i, it := range items {
		if out[i], err = ParseFrequency(it); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// LogGrid returns n frequencies spaced evenly on a logarithmic scale from
// lo to hi inclusive (n ≥ 2), or [lo] for n = 1.
func LogGrid(lo, hi float64, n int) []float64 {
	if n <= 1 {
		return []float64{lo}
	}
	out := make([]float64, n)
	r := math.Log(hi / lo)
	for i := range out {
		out[i] = lo * math.Exp(r*float64(i)/float64(n-1))
	}
	out[n-1] = hi
	return out
}

// Num is a float64 that marshals NaN and ±∞ as JSON null (an absent
// harmonic's −∞ dBc, an even/odd ratio with no odd content).
type Num float64

// MarshalJSON implements json.Marshaler.
func (n Num) MarshalJSON() ([]byte, error) {
	f := float64(n)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(f)
}

func db(ratio float64) float64 { return 20 * math.Log10(ratio) }
