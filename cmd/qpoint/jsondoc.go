package main

import (
	"bytes"
	"encoding/json"
	"io"
	"math"

	"qpoint/bias"
)

// number is a float64 that encodes as JSON null when it is not finite, as
// the results contract requires.
type number float64

func (n number) MarshalJSON() ([]byte, error) {
	f := float64(n)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(f)
}

// orderedNumbers is a JSON object of numbers that keeps its keys in the
// order given (file order), which a map would lose.
type orderedNumbers struct {
	keys   []string
	values []number
}

func (o *orderedNumbers) set(k string, v float64) {
	o.keys = append(o.keys, k)
	o.values = append(o.values, number(v))
}

func (o orderedNumbers) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, k := range o.keys {
		if i > 0 {
			b.WriteByte(',')
		}
		key, err := json.Marshal(k)
		if err != nil {
			return nil, err
		}
		val, err := o.values[i].MarshalJSON()
		if err != nil {
			return nil, err
		}
		b.Write(key)
		b.WriteByte(':')
		b.Write(val)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

type biasDiodeJSON struct {
	Name                 string `json:"name"`
	Model                string `json:"model"`
	Voltage              number `json:"voltage"`
	JunctionVoltage      number `json:"junction_voltage"`
	Current              number `json:"current"`
	DynamicResistance    number `json:"dynamic_resistance"`
	Conductance          number `json:"conductance"`
	SeriesResistance     number `json:"series_resistance"`
	JunctionCapacitance  number `json:"junction_capacitance"`
	DiffusionCapacitance number `json:"diffusion_capacitance"`
	Power                number `json:"power"`
	RatingFractions      struct {
		Current        number `json:"current"`
		ReverseVoltage number `json:"reverse_voltage"`
		Power          number `json:"power"`
	} `json:"rating_fractions"`
	InBreakdown bool `json:"in_breakdown"`
}

type sourceJSON struct {
	Name    string `json:"name"`
	Kind    string `json:"kind"`
	Current number `json:"current"`
}

type warningJSON struct {
	Part    string `json:"part"`
	Kind    string `json:"kind"`
	Message string `json:"message"`
}

type attemptJSON struct {
	Strategy   string `json:"strategy"`
	Iterations int    `json:"iterations"`
	Error      string `json:"error,omitempty"`
}

type biasJSON struct {
	Circuit     string          `json:"circuit"`
	File        string          `json:"file"`
	Temperature number          `json:"temperature"`
	Nodes       orderedNumbers  `json:"nodes"`
	Diodes      []biasDiodeJSON `json:"diodes"`
	Sources     []sourceJSON    `json:"sources"`
	Inductors   []sourceJSON    `json:"inductors"`
	Warnings    []warningJSON   `json:"warnings"`
	// Distributed lists the lines and blocks (omitted without them).
	Distributed []linePartJSON `json:"distributed,omitempty"`
	Solver      struct {
		Strategy   string        `json:"strategy"`
		Iterations int           `json:"iterations"`
		Residual   number        `json:"residual"`
		Attempts   []attemptJSON `json:"attempts"`
	} `json:"solver"`
}

func biasDocument(p *bias.Point) *biasJSON {
	d := &biasJSON{
		Circuit:     p.Circuit.Name,
		File:        p.Circuit.File,
		Temperature: number(p.TemperatureK),
		Diodes:      []biasDiodeJSON{},
		Sources:     []sourceJSON{},
		Inductors:   []sourceJSON{},
		Warnings:    []warningJSON{},
	}
	for _, n := range p.Nodes {
		d.Nodes.set(n.Name, n.Voltage)
	}
	for _, x := range p.Diodes {
		j := biasDiodeJSON{
			Name: x.Name, Model: x.Model,
			Voltage: number(x.Voltage), JunctionVoltage: number(x.JunctionVoltage),
			Current: number(x.Current), DynamicResistance: number(x.DynamicResistance),
			Conductance: number(x.Conductance), SeriesResistance: number(x.Device.Params.SeriesResistance),
			JunctionCapacitance: number(x.JunctionCapacitance), DiffusionCapacitance: number(x.DiffusionCapacitance),
			Power: number(x.Power), InBreakdown: x.InBreakdown,
		}
		j.RatingFractions.Current = number(x.CurrentFraction)
		j.RatingFractions.ReverseVoltage = number(x.ReverseVoltageFraction)
		j.RatingFractions.Power = number(x.PowerFraction)
		d.Diodes = append(d.Diodes, j)
	}
	for _, s := range p.Sources {
		d.Sources = append(d.Sources, sourceJSON{s.Name, s.Kind.String(), number(s.Current)})
	}
	for _, s := range p.Inductors {
		d.Inductors = append(d.Inductors, sourceJSON{s.Name, s.Kind.String(), number(s.Current)})
	}
	for _, w := range p.Warnings {
		d.Warnings = append(d.Warnings, warningJSON{w.Part, w.Kind.String(), w.Message})
	}
	d.Distributed = lineParts(p.Circuit, p)
	d.Solver.Strategy = p.Stats.Strategy.String()
	d.Solver.Iterations = p.Stats.Iterations
	d.Solver.Residual = number(p.Stats.Residual)
	for _, a := range p.Stats.Attempts {
		aj := attemptJSON{Strategy: a.Strategy.String(), Iterations: a.Iterations}
		if a.Err != nil {
			aj.Error = a.Err.Error()
		}
		d.Solver.Attempts = append(d.Solver.Attempts, aj)
	}
	return d
}

// writeJSON prints v as one indented JSON document.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
