package chains

import (
	"fmt"
	"strconv"
	"strings"

	"renderchain/models"
)

// SetError reports a bad --set override.
type SetError struct {
	Key, Msg string
}

func (e *SetError) Error() string { return oneLine(fmt.Sprintf("--set %s: %s", e.Key, e.Msg)) }

// Set applies one override "KEY=VALUE" to the chain. Keys:
//
//	supply, temperature, oversample, input.peak, output.load, output.full_scale
//	STAGE.KNOB        a knob's rotation, 0…1
//	STAGE.REF         a part's value (or a device's model name)
//	STAGE.REF.PARAM   a part's parameter (hfe, is, br, n, rs, taper, …)
func (ch *Chain) Set(kv string) error {
	key, val, ok := strings.Cut(kv, "=")
	key, val = strings.TrimSpace(key), strings.TrimSpace(val)
	if !ok || key == "" {
		return &SetError{Key: kv, Msg: "want KEY=VALUE"}
	}
	fail := func(format string, a ...any) error { return &SetError{Key: key, Msg: fmt.Sprintf(format, a...)} }
	scalar := func(dst *float64, q models.Quantity) error {
		x, err := models.ParseValue(val, q)
		if err != nil {
			return fail("%v", err)
		}
		old := *dst
		*dst = x
		if err := ch.checkScalars(); err != nil {
			*dst = old
			if e, ok := err.(*Error); ok {
				return fail("%s", e.Msg)
			}
			return fail("%v", err)
		}
		return nil
	}
	switch key {
	case "supply":
		return scalar(&ch.Supply, models.Voltage)
	case "temperature":
		return scalar(&ch.Temperature, models.Temperature)
	case "input.peak":
		return scalar(&ch.InputPeak, models.Voltage)
	case "output.full_scale":
		return scalar(&ch.FullScale, models.Voltage)
	case "output.load":
		if val == "none" || val == "open" {
			ch.Load = 0
			return nil
		}
		return scalar(&ch.Load, models.Resistance)
	case "oversample":
		n, err := strconv.Atoi(val)
		if err != nil || n < 1 || n > 16 {
			return fail("oversample %q must be a whole number 1…16", val)
		}
		ch.Oversample = n
		return nil
	}
	parts := strings.Split(key, ".")
	if len(parts) < 2 || len(parts) > 3 {
		return fail("unknown key (want supply, temperature, input.peak, output.load, output.full_scale, STAGE.KNOB, STAGE.REF or STAGE.REF.PARAM)")
	}
	st := ch.Stage(parts[0])
	if st == nil {
		var ids []string
		for _, s := range ch.Stages {
			ids = append(ids, s.ID)
		}
		return fail("no stage %q (stages: %s)", parts[0], strings.Join(ids, ", "))
	}
	if len(parts) == 2 {
		if _, isKnob := st.Knobs[parts[1]]; isKnob {
			x, err := strconv.ParseFloat(val, 64)
			if err != nil {
				return fail("knob value %q is not a number", val)
			}
			if x < 0 || x > 1 {
				return fail("knob value %g is outside 0…1 (0 fully counter-clockwise, 1 fully clockwise)", x)
			}
			st.Knobs[parts[1]] = x
			return nil
		}
	}
	p := st.part(parts[1])
	if p == nil {
		return fail("stage %s has no knob or part %q (knobs: %s; parts: %s)", st.ID, parts[1], listOr(keys(st.Knobs)), strings.Join(st.refs(), ", "))
	}
	field := "value"
	if len(parts) == 3 {
		field = parts[2]
		if field == "hFE" {
			field = "hfe"
		}
	}
	var v any = val
	if f, err := strconv.ParseFloat(val, 64); err == nil && field != "value" {
		v = f
	}
	saved := clonePart(p)
	if err := p.apply(map[string]any{field: v}, false); err != nil {
		*p = *saved
		return fail("%s", strings.TrimPrefix(err.Error(), "part "+p.Ref+": "))
	}
	if err := p.complete(); err != nil {
		*p = *saved
		return fail("%s", strings.TrimPrefix(err.Error(), "part "+p.Ref+": "))
	}
	return nil
}
