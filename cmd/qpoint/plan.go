package main

import (
	"errors"
	"fmt"
	"strings"

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

// gridRequest reads the grid flags into a plan request.
func gridRequest(from, to string, perDecade, points int) (plan.Grid, error) {
	g := plan.Grid{PerDecade: perDecade, Points: points}
	var err error
	if from != "" {
		if g.FromHz, err = circuit.ParseBounded(from, circuit.Frequency); err != nil {
			return g, inputError(fmt.Errorf("flag --from: %w", err))
		}
	}
	if to != "" {
		if g.ToHz, err = circuit.ParseBounded(to, circuit.Frequency); err != nil {
			return g, inputError(fmt.Errorf("flag --to: %w", err))
		}
	}
	return g, nil
}
