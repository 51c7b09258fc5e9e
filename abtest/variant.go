package abtest

import (
	"errors"
	"os"
	"path/filepath"
	"strings"

	"renderchain/chains"
)

// Variant is one candidate build: a label, the chain it starts from and the
// overrides applied to it.
type Variant struct {
	// Label names the variant on the page, in ab.json and in the file name.
	Label string
	// ChainFile is another chain file to start from, as written after "@";
	// empty for the chain given to Build.
	ChainFile string
	// Settings are --set overrides ("stage.knob=0.3", "stage.REF=22n", …),
	// applied in order. Empty: the chain as written.
	Settings []string
}

// ParseVariant reads a --variant text:
//
//	LABEL: KEY=VALUE KEY=VALUE …      overrides on the command's chain
//	LABEL:                            the chain as written
//	LABEL: @other.toml [KEY=VALUE …]  another chain file, optionally changed
//
// The label is everything before the first colon, trimmed; it may hold
// spaces but no colon. Overrides are separated by white space, so a value
// cannot contain a space (no value of a chain file needs one).
func ParseVariant(spec string) (Variant, error) {
	label, rest, ok := strings.Cut(spec, ":")
	if !ok {
		return Variant{}, &SpecError{Spec: spec, Msg: `want "LABEL: KEY=VALUE …" (a colon after the label)`}
	}
	v := Variant{Label: strings.TrimSpace(label), Settings: []string{}}
	if err := checkLabel(v.Label); err != nil {
		return Variant{}, &SpecError{Spec: spec, Msg: err.Error()}
	}
	for i, f := range strings.Fields(rest) {
		switch {
		case strings.HasPrefix(f, "@"):
			if i != 0 {
				return Variant{}, &SpecError{Spec: spec, Msg: "a chain file @FILE must come first, right after the colon"}
			}
			if v.ChainFile = f[1:]; v.ChainFile == "" {
				return Variant{}, &SpecError{Spec: spec, Msg: "empty chain file name after @"}
			}
		case !strings.Contains(f, "=") || strings.HasPrefix(f, "="):
			return Variant{}, &SpecError{Spec: spec, Msg: "override " + quote(f) + " is not KEY=VALUE"}
		default:
			v.Settings = append(v.Settings, f)
		}
	}
	return v, nil
}

// String formats v the way ParseVariant reads it.
func (v Variant) String() string {
	var b strings.Builder
	b.WriteString(v.Label)
	b.WriteString(":")
	if v.ChainFile != "" {
		b.WriteString(" @" + v.ChainFile)
	}
	for _, s := range v.Settings {
		b.WriteString(" " + s)
	}
	return b.String()
}

func quote(s string) string { return `"` + s + `"` }

// checkLabel accepts a non-empty label of at most 80 characters without
// control characters.
func checkLabel(l string) error {
	switch {
	case l == "":
		return errors.New("empty label")
	case len([]rune(l)) > 80:
		return errors.New("label longer than 80 characters")
	case strings.IndexFunc(l, func(r rune) bool { return r < 0x20 || r == 0x7f }) >= 0:
		return errors.New("label holds a control character")
	}
	return nil
}

// ResolveChainFile finds the file of a "@FILE" variant: as written when
// absolute; otherwise relative to the working directory if a file is there,
// else relative to the folder of the command's chain file (base). It
// returns the path as found, or the working-directory path when neither
// exists (so the error names what was tried first).
func ResolveChainFile(name, base string) string {
	if filepath.IsAbs(name) {
		return name
	}
	if st, err := os.Stat(name); err == nil && !st.IsDir() {
		return name
	}
	if base != "" {
		alt := filepath.Join(filepath.Dir(base), name)
		if st, err := os.Stat(alt); err == nil && !st.IsDir() {
			return alt
		}
	}
	return name
}

// resolve builds the variant's chain: a clone of base (the command's chain,
// its --set overrides already applied) or the @FILE chain, then the
// variant's settings. Errors are *VariantError.
func (v Variant) resolve(base *chains.Chain, basePath string) (*chains.Chain, string, error) {
	var ch *chains.Chain
	file := basePath
	if v.ChainFile == "" {
		ch = base.Clone()
	} else {
		file = ResolveChainFile(v.ChainFile, basePath)
		var err error
		if ch, err = chains.Load(file); err != nil {
			return nil, "", &VariantError{Label: v.Label, Err: err}
		}
	}
	for _, kv := range v.Settings {
		if err := ch.Set(kv); err != nil {
			return nil, "", &VariantError{Label: v.Label, Err: err}
		}
	}
	return ch, file, nil
}
