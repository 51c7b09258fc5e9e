package models

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ErrInvalid is the sentinel every value error of this package wraps: a
// value that does not parse (*ValueError), lies outside its range
// (*RangeError), contradicts the chain's supply polarity (*PolarityError),
// or an option a library refuses (*FieldError).
var ErrInvalid = errors.New("invalid value")

// Unwrap returns ErrInvalid.
func (e *ValueError) Unwrap() error { return ErrInvalid }

// Range is the interval a quantity must lie in. Bounds are inclusive
// unless marked open; an infinite bound is no bound. Unit names the unit
// in messages; Offset is subtracted before a value is shown (273.15 to
// show kelvin as degrees Celsius).
type Range struct {
	Lo, Hi         float64
	LoOpen, HiOpen bool
	Unit           string
	Offset         float64
}

// The ranges of the quantities a chain file, a --set key or a command
// line can hold. Each is a bound far from any pedal's values that still
// refuses what no circuit can mean.
var (
	// SupplyRange bounds a supply's magnitude: above 0 V, at most 60 V.
	SupplyRange = Range{Lo: 0, LoOpen: true, Hi: 60, Unit: "V"}
	// TemperatureRange is −60…150 °C, in kelvin: beyond it the junction
	// laws of this package are extrapolated far outside their data.
	TemperatureRange = Range{Lo: ZeroCelsius - 60, Hi: ZeroCelsius + 150, Unit: "°C", Offset: ZeroCelsius}
	// RotationRange is a knob's travel: 0 fully counter-clockwise, 1
	// fully clockwise.
	RotationRange = Range{Lo: 0, Hi: 1}
	// ToleranceRange is a part's tolerance as a fraction, 0 up to (not
	// including) 100 %.
	ToleranceRange = Range{Lo: 0, Hi: 1, HiOpen: true}
	// OversampleRange is the internal rate multiple of a render.
	OversampleRange = Range{Lo: 1, Hi: 16}
	// SignalRange bounds a source amplitude, an input peak and an output
	// full scale: above 0 V, at most 100 V.
	SignalRange = Range{Lo: 0, LoOpen: true, Hi: 100, Unit: "V"}
	// LargeSignal is the source amplitude, V peak, above which a test
	// sine or a chain's input peak is legal but beyond any guitar: a
	// passive pickup gives tens of millivolts to about a volt peak on a
	// hard strum, an active one a few volts (common practice, from
	// memory); more is most often millivolts written as volts.
	LargeSignal = 5.0
	// LoadRange bounds an output load: 0 (none) up to 1 TΩ.
	LoadRange = Range{Lo: 0, Hi: 1e12, Unit: "Ω"}
	// FrequencyRange bounds a frequency before a command checks it against
	// its own sample rate: above 0 Hz, at most 1 GHz.
	FrequencyRange = Range{Lo: 0, LoOpen: true, Hi: 1e9, Unit: "Hz"}
	// DurationRange bounds a time given on a command line: 0 s to a day.
	DurationRange = Range{Lo: 0, Hi: 86400, Unit: "s"}
	// GainRange bounds a transistor's current gain hFE: above 0, at most
	// 100 000 (no small-signal transistor comes near it).
	GainRange = Range{Lo: 0, LoOpen: true, Hi: 1e5}
)

// Contains reports whether v is finite and within r.
func (r Range) Contains(v float64) bool {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return false
	}
	if v < r.Lo || r.LoOpen && v == r.Lo || v > r.Hi || r.HiOpen && v == r.Hi {
		return false
	}
	return true
}

// Check returns nil for a value in the range, else a *RangeError.
func (r Range) Check(v float64) error {
	if r.Contains(v) {
		return nil
	}
	return &RangeError{Value: v, Range: r}
}

// show writes a value of the range's quantity for people.
func (r Range) show(v float64) string {
	v -= r.Offset
	var s string
	switch r.Unit {
	case "", "°C":
		s = strings.TrimSpace(strconv.FormatFloat(v, 'g', 6, 64) + " " + r.Unit)
	default:
		s = FormatValue(v, r.Unit)
	}
	if t, ok := strings.CutPrefix(s, "-"); ok {
		s = "−" + t // U+2212, the minus sign of printed ranges
	}
	return s
}

// Describe says what the range accepts: "1…16", "above 0 V", "above 0 V
// and at most 60 V", "at least 0 and below 1".
func (r Range) Describe() string {
	lo, hi := r.show(r.Lo), r.show(r.Hi)
	switch {
	case math.IsInf(r.Hi, 1) && r.LoOpen:
		return "above " + lo
	case math.IsInf(r.Hi, 1):
		return "at least " + lo
	case r.LoOpen && r.HiOpen:
		return "above " + lo + " and below " + hi
	case r.LoOpen:
		return "above " + lo + " and at most " + hi
	case r.HiOpen:
		return "at least " + lo + " and below " + hi
	}
	if r.Unit != "" {
		lo = r.show(r.Lo)
		lo = strings.TrimSuffix(lo, " "+r.Unit) // "−60…150 °C", unit once
	}
	return lo + "…" + hi
}

// RangeError reports a value outside its range (or not finite). Text is
// the value as written, when there is one.
type RangeError struct {
	What  string // the quantity, for messages ("amplitude"); may be empty
	Text  string
	Value float64
	Range Range
}

func (e *RangeError) Error() string {
	v := e.Range.show(e.Value)
	if e.Text != "" {
		v = strconv.Quote(e.Text)
	}
	if e.What != "" {
		v = e.What + " " + v
	}
	return v + " " + e.violation()
}

// violation words what is wrong, to follow the value: "is outside 1…16",
// "must be above 0 V", "is not a finite number".
func (e *RangeError) violation() string {
	r := e.Range
	switch {
	case math.IsNaN(e.Value) || math.IsInf(e.Value, 0):
		return "is not a finite number"
	case !r.LoOpen && !r.HiOpen && !math.IsInf(r.Hi, 1):
		return "is outside " + r.Describe()
	}
	return "must be " + r.Describe()
}

// Unwrap returns ErrInvalid.
func (e *RangeError) Unwrap() error { return ErrInvalid }

// checkText is Check for a value of quantity q read from text: the error
// names the quantity and quotes the text.
func (r Range) checkText(q Quantity, text string, v float64) (float64, error) {
	if err := r.Check(v); err != nil {
		return 0, &RangeError{What: q.String(), Text: strings.TrimSpace(text), Value: v, Range: r}
	}
	return v, nil
}

// FieldError reports an option a library refuses: its field (a stable
// lower-case name such as "amplitude", "sweep_level", "supply",
// "output"), the value as given, and why. Libraries name fields, never
// command-line flags; a command maps each field to its own flag.
type FieldError struct {
	Field string
	Value string // as given or formatted; may be empty
	Msg   string
	Err   error // the underlying error, if any
}

func (e *FieldError) Error() string {
	if e.Value == "" {
		return e.Field + ": " + e.Msg
	}
	return fmt.Sprintf("%s %q: %s", e.Field, e.Value, e.Msg)
}

// Unwrap returns the underlying error, else ErrInvalid.
func (e *FieldError) Unwrap() error {
	if e.Err != nil {
		return e.Err
	}
	return ErrInvalid
}

// Fieldf returns a *FieldError for field and value with a formatted
// message.
func Fieldf(field, value, format string, a ...any) *FieldError {
	return &FieldError{Field: field, Value: value, Msg: fmt.Sprintf(format, a...)}
}

// FieldOf wraps a parse or range error of this package as the field's
// error, keeping the reason and dropping the repeated value ("outside
// 0…1", "must be above 0 V"); nil stays nil.
func FieldOf(field, value string, err error) error {
	if err == nil {
		return nil
	}
	return &FieldError{Field: field, Value: value, Msg: strings.TrimPrefix(Reason(err), "is "), Err: err}
}

// Reason words a value error to follow the value it concerns ("is not a
// voltage (no number)", "is outside 0…1", "must be above 0 V", "is not a
// finite number"), for messages that name the value themselves.
func Reason(err error) string {
	var ve *ValueError
	var re *RangeError
	var pe *PolarityError
	switch {
	case errors.As(err, &ve) && ve.Reason != "":
		return fmt.Sprintf("is not %s %s (%s)", ve.Quantity.article(), ve.Quantity, ve.Reason)
	case errors.As(err, &ve):
		return fmt.Sprintf("is not %s %s", ve.Quantity.article(), ve.Quantity)
	case errors.As(err, &re):
		return re.violation()
	case errors.As(err, &pe):
		return "contradicts the chain's polarity: " + pe.Advice()
	}
	return "is wrong: " + err.Error()
}

// ParseIn reads a value of quantity q (ParseValue) and checks it against r.
func ParseIn(text string, q Quantity, r Range) (float64, error) {
	v, err := ParseValue(text, q)
	if err != nil {
		return 0, err
	}
	return r.checkText(q, text, v)
}

// ParseList splits a comma-separated list, trimming blanks; an empty item
// (",," or a trailing comma) is an error.
func ParseList(text string) ([]string, error) {
	var out []string
	for _, item := range strings.Split(text, ",") {
		item = strings.TrimSpace(item)
		if item == "" {
			return nil, &ValueError{Text: text, Quantity: Dimensionless, Reason: "a comma list with an empty item"}
		}
		out = append(out, item)
	}
	return out, nil
}

// parseEach applies parse to every item of a comma list.
func parseEach(text string, parse func(string) (float64, error)) ([]float64, error) {
	items, err := ParseList(text)
	if err != nil {
		return nil, err
	}
	out := make([]float64, len(items))
	for i, it := range items {
		if out[i], err = parse(it); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// ParseAmplitude reads the amplitude of a test sine and returns volts
// peak. Accepted forms:
//
//	0.1  100mV  0.1V  100mVp  0.1Vp     volts peak
//	20mVpp  1Vpp                        peak-to-peak (halved)
//	70.7mVrms  1Vrms                    RMS of a sine (× √2)
//	-20dBV  0dBV                        dB re 1 V RMS (sine: peak = √2·10^(x/20))
//
// The result must lie in SignalRange.
func ParseAmplitude(text string) (float64, error) {
	s := strings.TrimSpace(text)
	low := strings.ToLower(s)
	bad := func(reason string) (float64, error) {
		return 0, &ValueError{Text: text, Quantity: Amplitude, Reason: reason}
	}
	volts := func(s string, scale float64) (float64, error) {
		v, err := ParseValue(strings.TrimSpace(s), Voltage)
		if err != nil {
			var ve *ValueError
			if errors.As(err, &ve) {
				return bad(ve.Reason)
			}
			return 0, err
		}
		return v * scale, nil
	}
	var v float64
	var err error
	switch {
	case strings.HasSuffix(low, "dbv"):
		db, perr := strconv.ParseFloat(strings.TrimSpace(s[:len(s)-3]), 64)
		if perr != nil || math.IsNaN(db) || math.IsInf(db, 0) {
			return bad("want a level such as -20dBV")
		}
		v = math.Sqrt2 * math.Pow(10, db/20)
	case strings.HasSuffix(low, "vpp"):
		v, err = volts(s[:len(s)-2], 0.5)
	case strings.HasSuffix(low, "vrms"):
		v, err = volts(s[:len(s)-3], math.Sqrt2)
	case strings.HasSuffix(low, "vp"):
		v, err = volts(s[:len(s)-1], 1)
	default:
		v, err = volts(s, 1)
	}
	if err != nil {
		return 0, err
	}
	return SignalRange.checkText(Amplitude, text, v)
}

// ParseFrequency reads a frequency ("1k", "1kHz", "440") in hertz, within
// FrequencyRange.
func ParseFrequency(text string) (float64, error) {
	return ParseIn(text, Frequency, FrequencyRange)
}

// ParseFrequencies reads a comma-separated list of frequencies.
func ParseFrequencies(text string) ([]float64, error) { return parseEach(text, ParseFrequency) }

// PolarityError reports a supply whose written sign contradicts the
// polarity of the chain file it is applied to.
type PolarityError struct {
	Text  string  // as written
	Chain float64 // the chain file's supply, V
}

func (e *PolarityError) Error() string {
	return fmt.Sprintf("supply %q: %s", e.Text, e.Advice())
}

// Advice says what is wrong and how to write it, without the value.
func (e *PolarityError) Advice() string {
	want := "a positive supply (negative ground)"
	if e.Chain < 0 {
		want = "a negative supply (positive ground)"
	}
	mag := strings.TrimLeft(strings.TrimSpace(e.Text), "+-")
	return fmt.Sprintf("the chain file is built for %s; write %s or %s%s (a supply given outside the chain file sets the magnitude and keeps the file's polarity; change supply in the file to change the build)",
		want, mag, signOf(e.Chain), mag)
}

func signOf(v float64) string {
	if v < 0 {
		return "-"
	}
	return "+"
}

// Unwrap returns ErrInvalid.
func (e *PolarityError) Unwrap() error { return ErrInvalid }

// ParseSupply reads a supply voltage given outside the chain file (a
// --supply list, a --set supply= key, a variant) for a chain whose file
// says polarity (its supply, V). The chain file's sign is the build's
// polarity: the value sets the magnitude (a plain number is volts) and
// keeps that sign; a written sign that contradicts it is a
// *PolarityError. With polarity 0 the value is taken as written. The
// magnitude must lie in SupplyRange.
func ParseSupply(text string, polarity float64) (float64, error) {
	s := strings.TrimSpace(text)
	v, err := ParseValue(s, Voltage)
	if err != nil {
		return 0, err
	}
	if _, err := SupplyRange.checkText(Voltage, text, math.Abs(v)); err != nil {
		return 0, err
	}
	if polarity == 0 {
		return v, nil
	}
	signed := strings.HasPrefix(s, "-") || strings.HasPrefix(s, "+")
	if signed && (v < 0) != (polarity < 0) {
		return 0, &PolarityError{Text: s, Chain: polarity}
	}
	return math.Copysign(math.Abs(v), polarity), nil
}

// ParseSupplies reads a comma-separated list of supplies by ParseSupply's
// rule ("9.6,9,8,7").
func ParseSupplies(text string, polarity float64) ([]float64, error) {
	return parseEach(text, func(s string) (float64, error) { return ParseSupply(s, polarity) })
}

// ParseTemperature reads a temperature in kelvin: a plain number is
// degrees Celsius ("25"), "25C", "25°C" and "298.15K" are accepted; it
// must lie in TemperatureRange.
func ParseTemperature(text string) (float64, error) {
	return ParseIn(text, Temperature, TemperatureRange)
}

// ParseTemperatures reads a comma-separated list of temperatures.
func ParseTemperatures(text string) ([]float64, error) { return parseEach(text, ParseTemperature) }

// ParseRotation reads a knob's rotation, 0…1.
func ParseRotation(text string) (float64, error) {
	return ParseIn(text, Rotation, RotationRange)
}

// ParseTolerance reads a tolerance as a fraction: "5%" or 0.05, within
// ToleranceRange.
func ParseTolerance(text string) (float64, error) {
	s := strings.TrimSpace(text)
	scale := 1.0
	if t, ok := strings.CutSuffix(s, "%"); ok {
		s, scale = strings.TrimSpace(t), 0.01
	}
	v, err := ParseValue(s, Fraction)
	if err != nil {
		return 0, &ValueError{Text: text, Quantity: Fraction, Reason: "want a fraction or a percentage, e.g. 0.05 or 5%"}
	}
	return ToleranceRange.checkText(Fraction, text, v*scale)
}

// ParseDecibels reads a level or gain in dB ("30dB", "-3", "6 dB"); it
// must be finite.
func ParseDecibels(text string) (float64, error) {
	s := strings.TrimSpace(text)
	if t, ok := strings.CutSuffix(s, "dB"); ok {
		s = strings.TrimSpace(t)
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, &ValueError{Text: text, Quantity: Decibels, Reason: "want a number of dB, e.g. 30dB"}
	}
	return v, nil
}

// ParsePercent reads a percentage ("20%" or 20) and returns it in percent;
// it must be finite.
func ParsePercent(text string) (float64, error) {
	s := strings.TrimSpace(text)
	if t, ok := strings.CutSuffix(s, "%"); ok {
		s = strings.TrimSpace(t)
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, &ValueError{Text: text, Quantity: Percent, Reason: "want a percentage, e.g. 20%"}
	}
	return v, nil
}

// ParseSeconds reads a time: a plain number of seconds, or a number with
// a unit ("4s", "20ms"), within DurationRange.
func ParseSeconds(text string) (float64, error) {
	return ParseIn(text, Time, DurationRange)
}

// ParseGain reads a transistor's current gain (hFE), within GainRange.
func ParseGain(text string) (float64, error) {
	return ParseIn(text, Dimensionless, GainRange)
}

// ParseGains reads a comma-separated list of gains ("110,140,180").
func ParseGains(text string) ([]float64, error) { return parseEach(text, ParseGain) }

// ParseWhole reads a whole number within r ("8").
func ParseWhole(text string, r Range) (int, error) {
	n, err := strconv.Atoi(strings.TrimSpace(text))
	if err != nil {
		return 0, &ValueError{Text: text, Quantity: Dimensionless, Reason: "want a whole number"}
	}
	if _, err := r.checkText(Dimensionless, text, float64(n)); err != nil {
		return 0, err
	}
	return n, nil
}

// ParseSpan reads "FROM..TO" with parse for each bound. With open set,
// either bound may be left out (−∞ or +∞ in its place, at least one
// given); otherwise both are needed. The bounds must be in order: FROM
// below TO, or equal when open is set.
func ParseSpan(text string, parse func(string) (float64, error), open bool) (from, to float64, err error) {
	a, b, ok := strings.Cut(text, "..")
	if !ok {
		return 0, 0, &ValueError{Text: text, Quantity: Dimensionless, Reason: "want FROM..TO"}
	}
	a, b = strings.TrimSpace(a), strings.TrimSpace(b)
	from, to = math.Inf(-1), math.Inf(1)
	if a != "" || !open {
		if from, err = parse(a); err != nil {
			return 0, 0, err
		}
	}
	if b != "" || !open {
		if to, err = parse(b); err != nil {
			return 0, 0, err
		}
	}
	switch {
	case open && a == "" && b == "":
		return 0, 0, &ValueError{Text: text, Quantity: Dimensionless, Reason: "give at least one bound"}
	case open && from > to, !open && !(to > from):
		return 0, 0, &ValueError{Text: text, Quantity: Dimensionless, Reason: "bounds are reversed or equal: FROM must be below TO"}
	}
	return from, to, nil
}
