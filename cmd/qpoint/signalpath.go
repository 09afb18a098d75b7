package main

import (
	"errors"
	"fmt"
	"strings"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/bias/circuit"
)

// signalPath is where a signal enters and where it is observed.
type signalPath struct {
	in      int // input port index, -1 for a circuit without ports
	inName  string
	out     ac.Output
	outName string
}

// resolveSignalPath picks the input port and the output port or node from
// the flags, else the file's analysis.distortion, else the first and last
// ports. A circuit without ports has no input, and its output must be
// named as a node.
func resolveSignalPath(c *circuit.Circuit, input, output string) (*signalPath, error) {
	def := c.Analysis.Distortion
	var names []string
	for _, p := range c.Ports {
		names = append(names, p.Name)
	}
	portIndex := func(name string) int {
		for i, p := range c.Ports {
			if p.Name == name {
				return i
			}
		}
		return -1
	}
	sp := &signalPath{in: -1, inName: input, outName: output}
	if sp.inName == "" && def.Set {
		sp.inName = def.Input
	}
	if sp.inName == "" && len(c.Ports) > 0 {
		sp.inName = c.Ports[0].Name
	}
	if sp.inName != "" {
		if sp.in = portIndex(sp.inName); sp.in < 0 {
			return nil, inputError(fmt.Errorf("flag --input: `%s` is not a port; accepted: %s", sp.inName, strings.Join(names, ", ")))
		}
	}
	if sp.outName == "" && def.Set {
		sp.outName = def.Output
	}
	if sp.outName == "" && len(c.Ports) > 0 {
		sp.outName = c.Ports[len(c.Ports)-1].Name
	}
	if sp.outName == "" {
		return nil, inputError(fmt.Errorf("%s has no ports: give --output NODE, the node to observe", c.File))
	}
	sp.out = ac.Output{Port: portIndex(sp.outName), Node: sp.outName}
	if sp.out.Port < 0 {
		found := false
		for _, n := range c.Nodes {
			found = found || n == sp.outName
		}
		if !found {
			return nil, inputError(fmt.Errorf("flag --output: `%s` is neither a port nor a node; accepted ports: %s; or a node of the circuit", sp.outName, strings.Join(names, ", ")))
		}
	}
	return sp, nil
}

// planError turns a plan's error into the command's: a problem with the
// request names its flag (or the file's place) and is bad input; anything
// else is an analysis failure.
func planError(err error) error {
	var re *plan.RequestError
	if !errors.As(err, &re) {
		return analysisError(err)
	}
	if re.FromFile() {
		return inputError(err)
	}
	names := make([]string, len(re.Settings))
	for i, s := range re.Settings {
		names[i] = "--" + s
	}
	if len(names) == 1 {
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
