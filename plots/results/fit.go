package results

import (
	"qpoint/bias/extract"
	"qpoint/plots/report"
)

// FitValue is one fitted model value with its standard error.
type FitValue struct {
	Value  Number `json:"value"`
	Error  Number `json:"error"`
	Unit   string `json:"unit"`
	Status string `json:"status"`
}

// FitModel is the model's values in the circuit file's key order.
type FitModel struct {
	keys   []string
	values []FitValue
}

func (m FitModel) MarshalJSON() ([]byte, error) { return marshalOrdered(m.keys, m.values) }

// FitCorrelation is the correlation of two fitted values.
type FitCorrelation struct {
	Values      [2]string `json:"values"`
	Coefficient Number    `json:"coefficient"`
}

// FitCaution is a caution of the file reader or of the fit, placed in its file.
type FitCaution struct {
	Kind    string `json:"kind"`
	Value   string `json:"value,omitempty"`
	File    string `json:"file,omitempty"`
	Line    int    `json:"line,omitempty"`
	Message string `json:"message"`
}

// FitFile is one measurement file read for a fit.
type FitFile struct {
	File   string `json:"file"`
	Kind   string `json:"kind"`
	Points int    `json:"points"`
}

// FitPoint is one measured point with the model's value and the residual.
type FitPoint struct {
	File        string `json:"file,omitempty"`
	Line        int    `json:"line,omitempty"`
	Voltage     Number `json:"voltage"`
	Measured    Number `json:"measured"`
	Model       Number `json:"model"`
	Temperature Number `json:"temperature"`
	Residual    Number `json:"residual"`
}

// Fit is `fit --json`: the model, residuals, correlations, points and cautions.
type Fit struct {
	Name         string           `json:"name"`
	Model        FitModel         `json:"model"`
	ResidualRMS  Number           `json:"residual_rms"`
	Points       int              `json:"points"`
	Cautions     []FitCaution     `json:"cautions"`
	Correlations []FitCorrelation `json:"correlations"`
	Residuals    struct {
		Forward     Number `json:"forward"`
		Breakdown   Number `json:"breakdown"`
		Capacitance Number `json:"capacitance"`
	} `json:"residuals"`
	PointCounts struct {
		Forward     int `json:"forward"`
		Breakdown   int `json:"breakdown"`
		Capacitance int `json:"capacitance"`
	} `json:"point_counts"`
	Temperatures []Number  `json:"temperatures"`
	Files        []FitFile `json:"files"`
	Fitted       struct {
		Forward     []FitPoint `json:"forward"`
		Breakdown   []FitPoint `json:"breakdown"`
		Capacitance []FitPoint `json:"capacitance"`
	} `json:"fitted_points"`
	Stats struct {
		Iterations             int    `json:"iterations"`
		Evaluations            int    `json:"evaluations"`
		ForwardStep            Number `json:"forward_step"`
		CapacitanceEvaluations int    `json:"capacitance_evaluations"`
		CapacitanceStatus      string `json:"capacitance_status"`
		CapacitanceStep        Number `json:"capacitance_step"`
		Refits                 int    `json:"refits"`
	} `json:"stats"`
}

// FitOf is `fit --json`: the contract's model, residual_rms, points
// and cautions, and more.
func FitOf(in *report.FitInput, r *extract.Result) *Fit {
	d := &Fit{Name: in.Name, ResidualRMS: Number(r.Residuals.All),
		Cautions: []FitCaution{}, Correlations: []FitCorrelation{}, Temperatures: []Number{}}
	for _, v := range r.Values {
		d.Model.keys = append(d.Model.keys, v.Key)
		d.Model.values = append(d.Model.values, FitValue{Value: Number(v.Value), Error: Number(v.Error), Unit: v.Unit, Status: v.Status.String()})
	}
	d.Points = len(r.Forward) + len(r.Breakdown) + len(r.Capacitance)
	for _, c := range report.FitCautions(in, r) {
		d.Cautions = append(d.Cautions, FitCaution(c))
	}
	for _, c := range r.Correlations {
		d.Correlations = append(d.Correlations, FitCorrelation{Values: [2]string{c.A, c.B}, Coefficient: Number(c.Coefficient)})
	}
	d.Residuals.Forward, d.Residuals.Breakdown, d.Residuals.Capacitance = Number(r.Residuals.Forward), Number(r.Residuals.Breakdown), Number(r.Residuals.Capacitance)
	d.PointCounts.Forward, d.PointCounts.Breakdown, d.PointCounts.Capacitance = len(r.Forward), len(r.Breakdown), len(r.Capacitance)
	for _, t := range r.Temperatures {
		d.Temperatures = append(d.Temperatures, Number(t))
	}
	for _, f := range in.IV {
		d.Files = append(d.Files, FitFile{f.Path, "iv", len(f.Table.Points)})
	}
	for _, f := range in.CV {
		d.Files = append(d.Files, FitFile{f.Path, "cv", len(f.Table.Points)})
	}
	points := func(rs []extract.Residual, set bool) []FitPoint {
		out := []FitPoint{}
		for _, x := range rs {
			p := FitPoint{Voltage: Number(x.Voltage), Measured: Number(x.Measured), Model: Number(x.Model),
				Temperature: Number(x.TemperatureK), Residual: Number(x.Residual)}
			kind := in.IV
			if set {
				kind = in.CV
			}
			for _, f := range kind {
				if x.Index >= f.Offset && x.Index < f.Offset+len(f.Table.Points) {
					p.File, p.Line = f.Path, f.Table.Points[x.Index-f.Offset].Line
				}
			}
			out = append(out, p)
		}
		return out
	}
	d.Fitted.Forward, d.Fitted.Breakdown, d.Fitted.Capacitance = points(r.Forward, false), points(r.Breakdown, false), points(r.Capacitance, true)
	s := r.Stats
	d.Stats.Iterations, d.Stats.Evaluations, d.Stats.ForwardStep = s.Iterations, s.Evaluations, Number(s.ForwardStep)
	d.Stats.CapacitanceEvaluations, d.Stats.CapacitanceStatus, d.Stats.CapacitanceStep = s.CapacitanceEvaluations, s.CapacitanceStatus, Number(s.CapacitanceStep)
	d.Stats.Refits = s.Refits
	return d
}
