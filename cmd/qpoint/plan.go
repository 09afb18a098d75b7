package main

import (
	"errors"
	"fmt"
	"strings"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/bias/circuit"
)

// planError turns a plan's error into the command's: a problem with the
// request names its flag (or the file's place) and is bad input; anything
// else is an analysis failure.
func planError(err error) error {
	var re *plan.RequestError
	if !errors.As(err, &re) {
		return analysisError(err)
	}
	if re.FromFile() || len(re.Settings) == 0 {
		return inputError(err)
	}
	names := make([]string, len(re.Settings))
	for i, s := range re.Settings {
		names[i] = "--" + s
	}
	if len(names) == 1 {
		if strings.HasPrefix(re.Err.Error(), "is missing") {
			return inputError(fmt.Errorf("flag %s %w", names[0], re.Err))
		}
		return inputError(fmt.Errorf("flag %s: %w", names[0], re.Err))
	}
	return inputError(fmt.Errorf("flags %s: %w", strings.Join(names, ", "), re.Err))
}

// quantityFlag reads text, the value of the flag named flag, as a
// quantity q into dst, when it is given.
func quantityFlag(flag, text string, q circuit.Quantity, dst *float64) error {
	if text == "" {
		return nil
	}
	v, err := circuit.ParseBounded(text, q)
	if err != nil {
		return inputError(fmt.Errorf("flag --%s: %w", flag, err))
	}
	*dst = v
	return nil
}

// videoBandFlag reads --video-bandwidth, HIGH or LOW:HIGH, into dst when
// it is given.
func videoBandFlag(text string, dst *[2]float64) error {
	if text == "" {
		return nil
	}
	lo, hi, err := plan.ParseBand("video-bandwidth", text, plan.DefaultVideoFromHz)
	if err != nil {
		return planError(err)
	}
	*dst = [2]float64{lo, hi}
	return nil
}

// levelFlag reads text, the value of the flag named flag, as a signal
// level: nil when it is not given.
func levelFlag(flag, text string) (*circuit.Level, error) {
	if text == "" {
		return nil, nil
	}
	lv, err := circuit.ParseLevel(text)
	if err != nil {
		return nil, inputError(fmt.Errorf("flag --%s: %w", flag, err))
	}
	return &lv, nil
}

// gridRequest reads the grid flags into a plan request.
func gridRequest(from, to string, perDecade, points int) (plan.Grid, error) {
	g := plan.Grid{PerDecade: perDecade, Points: points}
	// A zero in the request means "the file's": a zero given here is
	// refused, not taken as no value.
	for _, f := range []struct {
		flag, text string
		dst        *float64
	}{{"from", from, &g.FromHz}, {"to", to, &g.ToHz}} {
		if f.text == "" {
			continue
		}
		v, err := circuit.ParseBounded(f.text, circuit.Frequency)
		if err == nil {
			err = ac.CheckFrequency(v)
		}
		if err != nil {
			return g, inputError(fmt.Errorf("flag --%s: %w", f.flag, err))
		}
		*f.dst = v
	}
	return g, nil
}
