package abtest

import (
	"errors"
	"fmt"
	"os"
	"strings"

	"renderchain/models"
)

// ErrSilent is the sentinel of a clip whose loudness cannot be measured.
var ErrSilent = errors.New("silent clip")

// paramErr is the error of an option outside its accepted range: a
// *models.FieldError naming the option's field (never a command-line
// flag: commands map fields to their flags).
func paramErr(field, value, want string) error {
	return &models.FieldError{Field: field, Value: value, Msg: "want " + want}
}

// SpecError reports a --variant text that cannot be read.
type SpecError struct {
	Spec string // the text as given
	Msg  string
}

func (e *SpecError) Error() string { return fmt.Sprintf("variant %q: %s", e.Spec, e.Msg) }

// Unwrap returns models.ErrInvalid.
func (e *SpecError) Unwrap() error { return models.ErrInvalid }

// VariantError reports a variant whose chain could not be loaded, changed
// or prepared: an unknown --set key, a bad value, a chain file that does not
// parse, an operating point that does not converge.
type VariantError struct {
	Label string
	Err   error
}

func (e *VariantError) Error() string { return fmt.Sprintf("variant %q: %v", e.Label, e.Err) }

func (e *VariantError) Unwrap() error { return e.Err }

// LabelError reports an unusable or repeated label.
type LabelError struct {
	Label string
	Msg   string
}

func (e *LabelError) Error() string { return fmt.Sprintf("label %q: %s", e.Label, e.Msg) }

// Unwrap returns models.ErrInvalid.
func (e *LabelError) Unwrap() error { return models.ErrInvalid }

// ExistsError reports an output folder that already holds clips from an
// earlier run; Options.Force replaces them.
type ExistsError struct {
	Dir   string
	Files []string // a few of the files found
}

func (e *ExistsError) Error() string {
	list := e.Files
	more := ""
	if len(list) > 3 {
		list, more = list[:3], ", …"
	}
	return fmt.Sprintf("%s holds clips from an earlier run (%s%s): replace them with the force option",
		e.Dir, strings.Join(list, ", "), more)
}

// Unwrap returns os.ErrExist.
func (e *ExistsError) Unwrap() error { return os.ErrExist }

// ShortTakeError reports a dry take too short for what was asked of it.
type ShortTakeError struct {
	File    string
	Seconds float64 // the take's length
	Need    float64 // the length needed
	Why     string  // what needs it
}

func (e *ShortTakeError) Error() string {
	return fmt.Sprintf("%s: the dry take lasts %.3f s but %s needs %.3f s", e.File, e.Seconds, e.Why, e.Need)
}

// Unwrap returns models.ErrInvalid.
func (e *ShortTakeError) Unwrap() error { return models.ErrInvalid }

// SilentError reports a clip whose loudness cannot be measured because no
// 400 ms block passes the −70 LUFS gate, so no gain can match it.
type SilentError struct {
	Label string
}

func (e *SilentError) Error() string {
	return fmt.Sprintf("clip %q is silent (no 400 ms block above −70 LUFS): its loudness cannot be matched", e.Label)
}

// Unwrap returns ErrSilent.
func (e *SilentError) Unwrap() error { return ErrSilent }
