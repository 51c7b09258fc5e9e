package chains

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"renderchain/models"
)

// SetError reports an override that cannot be applied: the key as
// written and why.
type SetError struct {
	Key, Msg string
	Err      error // the underlying value error, if any
}

func (e *SetError) Error() string { return oneLine(fmt.Sprintf("override %s: %s", e.Key, e.Msg)) }

// Unwrap returns the underlying error, else ErrChain.
func (e *SetError) Unwrap() error {
	if e.Err != nil {
		return e.Err
	}
	return ErrChain
}

// SetKeys lists the chain's own override keys.
var SetKeys = []string{"supply", "temperature", "oversample", "input.peak", "output.load", "output.full_scale"}

// Set applies one override "KEY=VALUE" to the chain. Keys:
//
//	supply, temperature, oversample, input.peak, output.load, output.full_scale
//	STAGE.KNOB        a knob's rotation, 0…1
//	STAGE.REF         a part's value (a device's model name, a switch's
//	                  position by name or by place from 1)
//	STAGE.REF.PARAM   a part's parameter (hfe, is, br, n, rs, taper,
//	                  early_voltage, idss, gbw, coupling, w2_turns, …)
//	power.REF …       the same for the [power] table's supply network
//
// Every value goes through its quantity's parser in package models, so it
// is finite and in range. A supply sets the magnitude and keeps the chain
// file's polarity (models.ParseSupply): "supply=7V" on a positive-ground
// build is −7 V, and a sign that contradicts the file is an error.
func (ch *Chain) Set(kv string) error {
	key, val, ok := strings.Cut(kv, "=")
	key, val = strings.TrimSpace(key), strings.TrimSpace(val)
	if !ok || key == "" {
		return &SetError{Key: kv, Msg: "want KEY=VALUE"}
	}
	fail := func(format string, a ...any) error { return &SetError{Key: key, Msg: fmt.Sprintf(format, a...)} }
	bad := func(err error) error {
		var pe *models.PolarityError
		var ve *models.ValueError
		switch {
		case errors.As(err, &pe):
			return &SetError{Key: key, Msg: strconv.Quote(val) + ": " + pe.Advice(), Err: err}
		case errors.As(err, &ve):
			return &SetError{Key: key, Msg: err.Error(), Err: err}
		}
		return &SetError{Key: key, Msg: fmt.Sprintf("%q %s", val, models.Reason(err)), Err: err}
	}
	scalar := func(dst *float64, v float64, err error) error {
		if err != nil {
			return bad(err)
		}
		*dst = v
		return nil
	}
	switch key {
	case "supply":
		v, err := models.ParseSupply(val, ch.Polarity())
		if err == nil {
			ch.SupplyAssumed = false
		}
		return scalar(&ch.Supply, v, err)
	case "temperature":
		v, err := models.ParseTemperature(val)
		return scalar(&ch.Temperature, v, err)
	case "input.peak":
		v, err := models.ParseIn(val, models.Voltage, models.SignalRange)
		return scalar(&ch.InputPeak, v, err)
	case "output.full_scale":
		v, err := models.ParseIn(val, models.Voltage, models.SignalRange)
		return scalar(&ch.FullScale, v, err)
	case "output.load":
		if val == "none" || val == "open" {
			ch.Load = 0
			return nil
		}
		v, err := models.ParseIn(val, models.Resistance, models.LoadRange)
		return scalar(&ch.Load, v, err)
	case "oversample":
		n, err := models.ParseWhole(val, models.OversampleRange)
		if err != nil {
			return bad(err)
		}
		ch.Oversample = n
		return nil
	}
	parts := strings.Split(key, ".")
	if len(parts) < 2 || len(parts) > 3 {
		return fail("unknown key (want %s, STAGE.KNOB, STAGE.REF or STAGE.REF.PARAM)%s", strings.Join(SetKeys, ", "), didYouMean(key, SetKeys))
	}
	st := ch.StageOf(parts[0])
	if st == nil {
		var ids []string
		for _, s := range ch.PartStages() {
			ids = append(ids, s.ID)
		}
		return fail("no stage %q (stages: %s)%s", parts[0], strings.Join(ids, ", "), didYouMean(parts[0], ids))
	}
	if len(parts) == 2 {
		if _, isKnob := st.Knobs[parts[1]]; isKnob {
			x, err := models.ParseRotation(val)
			if err != nil {
				return &SetError{Key: key, Msg: fmt.Sprintf("knob value %q %s (0 fully counter-clockwise, 1 fully clockwise)", val, models.Reason(err)), Err: err}
			}
			st.Knobs[parts[1]] = x
			return nil
		}
	}
	p := st.part(parts[1])
	if p == nil {
		return fail("stage %s has no knob or part %q (knobs: %s; parts: %s)%s", st.ID, parts[1], listOr(keys(st.Knobs)), strings.Join(st.refs(), ", "),
			didYouMean(parts[1], append(keys(st.Knobs), st.refs()...)))
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
		v = f // a plain number; apply and complete refuse NaN and infinities
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
