package models_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"renderchain/models"
)

// FuzzParseValue: for any text and quantity ParseValue never panics; an
// error is a *ValueError on one short line; a value is finite, and for a
// resistance FormatValue's four significant digits read back within half
// a unit in the fourth digit (relative 5e-4: the rounding of 4 significant
// digits, the SI prefixes being exact powers of ten, SI Brochure table 7).
// The seed corpus is in testdata/fuzz/FuzzParseValue.
func FuzzParseValue(f *testing.F) {
	f.Add("4k7", uint8(models.Resistance))
	f.Fuzz(func(t *testing.T, text string, qn uint8) {
		q := models.Quantity(qn % uint8(models.Length+1))
		v, err := models.ParseValue(text, q)
		if err != nil {
			var ve *models.ValueError
			if !errors.As(err, &ve) {
				t.Fatalf("error %T, want *ValueError", err)
			}
			if msg := err.Error(); strings.ContainsAny(msg, "\r\n") || len(msg) > 400 {
				t.Fatalf("message of %d bytes or several lines: %q", len(msg), msg)
			}
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("ParseValue(%q) = %g", text, v)
		}
		if q != models.Resistance || v == 0 {
			return
		}
		s := models.FormatValue(v, "Ω")
		w, err := models.ParseValue(s, models.Resistance)
		if err != nil {
			t.Fatalf("FormatValue(%g) = %q does not read back: %v", v, s, err)
		}
		if math.Abs(w-v) > 5e-4*math.Abs(v) {
			t.Fatalf("%q → %g → %q → %g", text, v, s, w)
		}
	})
}

// The case: a 1 MB value gives a short error that shows the value
// once, elided, with its length.
func TestValueErrorLongText(t *testing.T) {
	text := "4k7" + strings.Repeat("x", 1<<20)
	_, err := models.ParseValue(text, models.Resistance)
	if err == nil {
		t.Fatal("accepted")
	}
	msg := err.Error()
	if len(msg) > 200 || strings.Count(msg, "x") > 100 || !strings.Contains(msg, "(1048579 bytes)") {
		t.Errorf("message of %d bytes: %.300q", len(msg), msg)
	}
	// Short values are quoted whole, as before.
	_, err = models.ParseValue("22kk", models.Resistance)
	if !strings.HasPrefix(err.Error(), `value "22kk" is not a resistance (`) {
		t.Errorf("short message changed: %q", err)
	}
	// Multi-byte characters are cut whole.
	_, err = models.ParseValue(strings.Repeat("µ", 100), models.Capacitance)
	if msg := err.Error(); !strings.Contains(msg, `"`+strings.Repeat("µ", 40)+`"… (200 bytes)`) {
		t.Errorf("message %q", msg)
	}
}
