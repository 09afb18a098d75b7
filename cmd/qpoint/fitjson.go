package main

import (
	"bytes"
	"encoding/json"

	"qpoint/bias/extract"
)

type fitValueJSON struct {
	Value  number `json:"value"`
	Error  number `json:"error"`
	Unit   string `json:"unit"`
	Status string `json:"status"`
}

// fitModelJSON is the model's values in the circuit file's key order.
type fitModelJSON struct {
	keys   []string
	values []fitValueJSON
}

func (m fitModelJSON) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, k := range m.keys {
		if i > 0 {
			b.WriteByte(',')
		}
		key, _ := json.Marshal(k)
		val, err := json.Marshal(m.values[i])
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

type fitCorrelationJSON struct {
	Values      [2]string `json:"values"`
	Coefficient number    `json:"coefficient"`
}

type fitCautionJSON struct {
	Kind    string `json:"kind"`
	Value   string `json:"value,omitempty"`
	File    string `json:"file,omitempty"`
	Line    int    `json:"line,omitempty"`
	Message string `json:"message"`
}

type fitFileJSON struct {
	File   string `json:"file"`
	Kind   string `json:"kind"`
	Points int    `json:"points"`
}

type fitPointJSON struct {
	File        string `json:"file,omitempty"`
	Line        int    `json:"line,omitempty"`
	Voltage     number `json:"voltage"`
	Measured    number `json:"measured"`
	Model       number `json:"model"`
	Temperature number `json:"temperature"`
	Residual    number `json:"residual"`
}

type fitJSON struct {
	Name         string               `json:"name"`
	Model        fitModelJSON         `json:"model"`
	ResidualRMS  number               `json:"residual_rms"`
	Points       int                  `json:"points"`
	Cautions     []fitCautionJSON     `json:"cautions"`
	Correlations []fitCorrelationJSON `json:"correlations"`
	Residuals    struct {
		Forward     number `json:"forward"`
		Breakdown   number `json:"breakdown"`
		Capacitance number `json:"capacitance"`
	} `json:"residuals"`
	PointCounts struct {
		Forward     int `json:"forward"`
		Breakdown   int `json:"breakdown"`
		Capacitance int `json:"capacitance"`
	} `json:"point_counts"`
	Temperatures []number      `json:"temperatures"`
	Files        []fitFileJSON `json:"files"`
	Fitted       struct {
		Forward     []fitPointJSON `json:"forward"`
		Breakdown   []fitPointJSON `json:"breakdown"`
		Capacitance []fitPointJSON `json:"capacitance"`
	} `json:"fitted_points"`
	Stats struct {
		Iterations             int    `json:"iterations"`
		Evaluations            int    `json:"evaluations"`
		ForwardStep            number `json:"forward_step"`
		CapacitanceEvaluations int    `json:"capacitance_evaluations"`
		CapacitanceStatus      string `json:"capacitance_status"`
		CapacitanceStep        number `json:"capacitance_step"`
		Refits                 int    `json:"refits"`
	} `json:"stats"`
}

// fitDocument is `fit --json`: the contract's model, residual_rms, points
// and cautions, and more.
func fitDocument(in *fitInput, r *extract.Result) *fitJSON {
	d := &fitJSON{Name: in.name, ResidualRMS: number(r.Residuals.All),
		Cautions: []fitCautionJSON{}, Correlations: []fitCorrelationJSON{}, Temperatures: []number{}}
	for _, v := range r.Values {
		d.Model.keys = append(d.Model.keys, v.Key)
		d.Model.values = append(d.Model.values, fitValueJSON{Value: number(v.Value), Error: number(v.Error), Unit: v.Unit, Status: v.Status.String()})
	}
	d.Points = len(r.Forward) + len(r.Breakdown) + len(r.Capacitance)
	for _, c := range fitCautions(in, r) {
		d.Cautions = append(d.Cautions, fitCautionJSON(c))
	}
	for _, c := range r.Correlations {
		d.Correlations = append(d.Correlations, fitCorrelationJSON{Values: [2]string{c.A, c.B}, Coefficient: number(c.Coefficient)})
	}
	d.Residuals.Forward, d.Residuals.Breakdown, d.Residuals.Capacitance = number(r.Residuals.Forward), number(r.Residuals.Breakdown), number(r.Residuals.Capacitance)
	d.PointCounts.Forward, d.PointCounts.Breakdown, d.PointCounts.Capacitance = len(r.Forward), len(r.Breakdown), len(r.Capacitance)
	for _, t := range r.Temperatures {
		d.Temperatures = append(d.Temperatures, number(t))
	}
	for _, f := range in.iv {
		d.Files = append(d.Files, fitFileJSON{f.path, "iv", len(f.table.Points)})
	}
	for _, f := range in.cv {
		d.Files = append(d.Files, fitFileJSON{f.path, "cv", len(f.table.Points)})
	}
	points := func(rs []extract.Residual, set bool) []fitPointJSON {
		out := []fitPointJSON{}
		for _, x := range rs {
			p := fitPointJSON{Voltage: number(x.Voltage), Measured: number(x.Measured), Model: number(x.Model),
				Temperature: number(x.TemperatureK), Residual: number(x.Residual)}
			kind := in.iv
			if set {
				kind = in.cv
			}
			for _, f := range kind {
				if x.Index >= f.offset && x.Index < f.offset+len(f.table.Points) {
					p.File, p.Line = f.path, f.table.Points[x.Index-f.offset].Line
				}
			}
			out = append(out, p)
		}
		return out
	}
	d.Fitted.Forward, d.Fitted.Breakdown, d.Fitted.Capacitance = points(r.Forward, false), points(r.Breakdown, false), points(r.Capacitance, true)
	s := r.Stats
	d.Stats.Iterations, d.Stats.Evaluations, d.Stats.ForwardStep = s.Iterations, s.Evaluations, number(s.ForwardStep)
	d.Stats.CapacitanceEvaluations, d.Stats.CapacitanceStatus, d.Stats.CapacitanceStep = s.CapacitanceEvaluations, s.CapacitanceStatus, number(s.CapacitanceStep)
	d.Stats.Refits = s.Refits
	return d
}
