package results

import (
	"bytes"
	"encoding/json"
	"io"
	"math"

	"qpoint/bias"
)

// Number is a float64 that encodes as JSON null when it is not finite, as
// the results contract requires.
type Number float64

func (n Number) MarshalJSON() ([]byte, error) {
	f := float64(n)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(f)
}

// OrderedNumbers is a JSON object of numbers that keeps its keys in the
// order given (file order), which a map would lose.
type OrderedNumbers struct {
	keys   []string
	values []Number
}

// Set adds key k with the value v after the keys set before.
func (o *OrderedNumbers) Set(k string, v float64) {
	o.keys = append(o.keys, k)
	o.values = append(o.values, Number(v))
}

func (o OrderedNumbers) MarshalJSON() ([]byte, error) { return marshalOrdered(o.keys, o.values) }

// marshalOrdered writes a JSON object of the keys and values in their
// order.
func marshalOrdered[T any](keys []string, values []T) ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, k := range keys {
		if i > 0 {
			b.WriteByte(',')
		}
		key, err := json.Marshal(k)
		if err != nil {
			return nil, err
		}
		val, err := json.Marshal(values[i])
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

// BiasDiode is one diode of the bias document: its Q point, small-signal values and rating fractions.
type BiasDiode struct {
	Name                 string `json:"name"`
	Model                string `json:"model"`
	Voltage              Number `json:"voltage"`
	JunctionVoltage      Number `json:"junction_voltage"`
	Current              Number `json:"current"`
	DynamicResistance    Number `json:"dynamic_resistance"`
	Conductance          Number `json:"conductance"`
	SeriesResistance     Number `json:"series_resistance"`
	JunctionCapacitance  Number `json:"junction_capacitance"`
	DiffusionCapacitance Number `json:"diffusion_capacitance"`
	Power                Number `json:"power"`
	RatingFractions      struct {
		Current        Number `json:"current"`
		ReverseVoltage Number `json:"reverse_voltage"`
		Power          Number `json:"power"`
	} `json:"rating_fractions"`
	InBreakdown bool `json:"in_breakdown"`
}

// Source is a DC source's or an inductor's current, flowing into its plus (or to) terminal.
type Source struct {
	Name    string `json:"name"`
	Kind    string `json:"kind"`
	Current Number `json:"current"`
}

// Warning is one of the bias point's typed warnings.
type Warning struct {
	Part    string `json:"part"`
	Kind    string `json:"kind"`
	Message string `json:"message"`
}

// Attempt is one strategy the DC solver tried.
type Attempt struct {
	Strategy   string `json:"strategy"`
	Iterations int    `json:"iterations"`
	Error      string `json:"error,omitempty"`
}

// Bias is `bias --json`: node voltages, diode Q points, source currents, warnings and the solver's record.
type Bias struct {
	Circuit     string         `json:"circuit"`
	File        string         `json:"file"`
	Temperature Number         `json:"temperature"`
	Nodes       OrderedNumbers `json:"nodes"`
	Diodes      []BiasDiode    `json:"diodes"`
	Sources     []Source       `json:"sources"`
	Inductors   []Source       `json:"inductors"`
	Warnings    []Warning      `json:"warnings"`
	// Distributed lists the lines and blocks (omitted without them).
	Distributed []LinePart `json:"distributed,omitempty"`
	Solver      struct {
		Strategy   string    `json:"strategy"`
		Iterations int       `json:"iterations"`
		Residual   Number    `json:"residual"`
		Attempts   []Attempt `json:"attempts"`
	} `json:"solver"`
}

// BiasOf returns the bias document of p.
func BiasOf(p *bias.Point) *Bias {
	d := &Bias{
		Circuit:     p.Circuit.Name,
		File:        p.Circuit.File,
		Temperature: Number(p.TemperatureK),
		Diodes:      []BiasDiode{},
		Sources:     []Source{},
		Inductors:   []Source{},
		Warnings:    []Warning{},
	}
	for _, n := range p.Nodes {
		d.Nodes.Set(n.Name, n.Voltage)
	}
	for _, x := range p.Diodes {
		j := BiasDiode{
			Name: x.Name, Model: x.Model,
			Voltage: Number(x.Voltage), JunctionVoltage: Number(x.JunctionVoltage),
			Current: Number(x.Current), DynamicResistance: Number(x.DynamicResistance),
			Conductance: Number(x.Conductance), SeriesResistance: Number(x.Device.Params.SeriesResistance),
			JunctionCapacitance: Number(x.JunctionCapacitance), DiffusionCapacitance: Number(x.DiffusionCapacitance),
			Power: Number(x.Power), InBreakdown: x.InBreakdown,
		}
		j.RatingFractions.Current = Number(x.CurrentFraction)
		j.RatingFractions.ReverseVoltage = Number(x.ReverseVoltageFraction)
		j.RatingFractions.Power = Number(x.PowerFraction)
		d.Diodes = append(d.Diodes, j)
	}
	for _, s := range p.Sources {
		d.Sources = append(d.Sources, Source{s.Name, s.Kind.String(), Number(s.Current)})
	}
	for _, s := range p.Inductors {
		d.Inductors = append(d.Inductors, Source{s.Name, s.Kind.String(), Number(s.Current)})
	}
	for _, w := range p.Warnings {
		d.Warnings = append(d.Warnings, Warning{w.Part, w.Kind.String(), w.Message})
	}
	d.Distributed = LinePartsOf(p.Circuit, p)
	d.Solver.Strategy = p.Stats.Strategy.String()
	d.Solver.Iterations = p.Stats.Iterations
	d.Solver.Residual = Number(p.Stats.Residual)
	for _, a := range p.Stats.Attempts {
		aj := Attempt{Strategy: a.Strategy.String(), Iterations: a.Iterations}
		if a.Err != nil {
			aj.Error = a.Err.Error()
		}
		d.Solver.Attempts = append(d.Solver.Attempts, aj)
	}
	return d
}

// Write prints v as one indented JSON document.
func Write(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
