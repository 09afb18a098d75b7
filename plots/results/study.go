package results

import (
	"encoding/csv"
	"io"
	"strconv"

	"qpoint/ac/plan"
	"qpoint/ac/study"
	"qpoint/plots/report"
)

// StudyDiode is one diode's values at a step.
type StudyDiode struct {
	Name                 string   `json:"name"`
	Current              Number   `json:"current"`
	Voltage              Number   `json:"voltage"`
	DynamicResistance    Number   `json:"dynamic_resistance"`
	JunctionCapacitance  Number   `json:"junction_capacitance"`
	DiffusionCapacitance Number   `json:"diffusion_capacitance"`
	VideoResistance      Number   `json:"video_resistance"`
	CurrentSensitivity   []Number `json:"current_sensitivity"`
	VoltageSensitivity   []Number `json:"voltage_sensitivity"`
}

// StudyResponse is the response at one frequency of a step.
type StudyResponse struct {
	Frequency      Number         `json:"frequency"`
	S              [][]Complex    `json:"s"`
	InputImpedance []Complex      `json:"input_impedance"`
	Probes         OrderedComplex `json:"probes"`
}

// StudyStep is one step of a study.
type StudyStep struct {
	Values      []Number          `json:"values"`
	Iterations  int               `json:"iterations"`
	Diodes      []StudyDiode      `json:"diodes"`
	Responses   []StudyResponse   `json:"responses"`
	Distortion  []StudyDistortion `json:"distortion,omitempty"`
	NoiseFigure []Number          `json:"noise_figure_db,omitempty"`
	NEP         *Number           `json:"nep,omitempty"`
	TSSdBm      *Number           `json:"tangential_sensitivity_dbm,omitempty"`
	HD2dBc      *Number           `json:"hd2_dbc,omitempty"`
	HD3dBc      *Number           `json:"hd3_dbc,omitempty"`
	DCShift     *Number           `json:"dc_shift,omitempty"`
	Sensitivity *Number           `json:"sensitivity,omitempty"`
	Warnings    []Warning         `json:"warnings"`
	Error       string            `json:"error,omitempty"`
}

// StudyDistortion is the distortion estimate at one frequency of a step.
type StudyDistortion struct {
	Frequency   Number `json:"frequency"`
	Fundamental Number `json:"fundamental"`
	HD2dBc      Number `json:"hd2_dbc"`
	HD3dBc      Number `json:"hd3_dbc"`
	DCShift     Number `json:"dc_shift"`
	Sensitivity Number `json:"sensitivity"`
}

// Solution is the target, maximum or minimum a study found.
type Solution struct {
	Goal       string    `json:"goal"`
	Measure    string    `json:"measure"`
	Target     *Number   `json:"target,omitempty"`
	Value      Number    `json:"value"`
	Achieved   Number    `json:"achieved"`
	Bracket    [2]Number `json:"bracket"`
	Tolerance  Number    `json:"tolerance"`
	Iterations int       `json:"iterations"`
	AtEdge     bool      `json:"at_edge"`
	// OnMagnitude: the optimisation compared |measure|, its sign being a
	// polarity; achieved keeps the sign.
	OnMagnitude bool `json:"on_magnitude,omitempty"`
}

// Study is `study --json`.
type Study struct {
	Vary     []string    `json:"vary"`
	Shape    [2]int      `json:"shape"`
	Newton   int         `json:"newton_iterations"`
	Steps    []StudyStep `json:"steps"`
	Solution *Solution   `json:"solution,omitempty"`
	Columns  []string    `json:"columns"`
}

// StudyOf returns the study document of r with its columns, the plan s and its solution sol (nil without a goal).
func StudyOf(r *study.Result, cols []report.StudyColumn, s *plan.Study, sol *study.Solution) *Study {
	d := &Study{Vary: []string{r.Settings.Axis.Vary.Text}, Shape: r.Shape, Newton: r.Newton}
	if r.Settings.Second != nil {
		if r.Settings.SecondIsFrequency {
			d.Vary = append(d.Vary, "frequency")
		} else {
			d.Vary = append(d.Vary, r.Settings.Second.Vary.Text)
		}
	}
	for _, c := range cols {
		d.Columns = append(d.Columns, c.Key)
	}
	for i := range r.Steps {
		st := &r.Steps[i]
		j := StudyStep{Iterations: st.Iterations, Diodes: []StudyDiode{}, Responses: []StudyResponse{}, Warnings: []Warning{}}
		j.Values = append(j.Values, Number(st.Values[0]))
		if r.Settings.Second != nil {
			j.Values = append(j.Values, Number(st.Values[1]))
		}
		if st.Err != nil {
			j.Error = st.Err.Error()
			d.Steps = append(d.Steps, j)
			continue
		}
		for _, x := range st.Diodes {
			dj := StudyDiode{Name: x.Name, Current: Number(x.Current), Voltage: Number(x.Voltage),
				DynamicResistance: Number(x.DynamicResistance), JunctionCapacitance: Number(x.JunctionCapacitance),
				DiffusionCapacitance: Number(x.DiffusionCapacitance), VideoResistance: Number(x.VideoResistance)}
			for k := range x.CurrentSensitivity {
				dj.CurrentSensitivity = append(dj.CurrentSensitivity, Number(x.CurrentSensitivity[k]))
				dj.VoltageSensitivity = append(dj.VoltageSensitivity, Number(x.VoltageSensitivity[k]))
			}
			j.Diodes = append(j.Diodes, dj)
		}
		for _, resp := range st.Responses {
			rj := StudyResponse{Frequency: Number(resp.FrequencyHz)}
			rj.S, rj.InputImpedance, rj.Probes = networkJSON(resp.S, resp.InputImpedance, r.Probes, resp.Probes)
			j.Responses = append(j.Responses, rj)
		}
		for k, x := range st.Distortion {
			j.Distortion = append(j.Distortion, StudyDistortion{Number(x.FrequencyHz), Number(x.Fundamental),
				Number(x.HD2dBc), Number(x.HD3dBc), Number(x.DCShift), Number(x.Sensitivity)})
			if k == 0 {
				// The first distortion frequency's figures also at the
				// step's top level, where earlier versions put them.
				j.HD2dBc, j.HD3dBc, j.DCShift, j.Sensitivity = ptr(x.HD2dBc), ptr(x.HD3dBc), ptr(x.DCShift), ptr(x.Sensitivity)
			}
		}
		for _, nf := range st.NoiseFigureDB {
			j.NoiseFigure = append(j.NoiseFigure, Number(nf))
		}
		if r.Settings.Detector != nil {
			d := report.Detection(st)
			j.NEP, j.TSSdBm = ptr(d.NEP), ptr(d.TangentialDBm)
		}
		for _, w := range st.Warnings {
			j.Warnings = append(j.Warnings, Warning{w.Part, w.Kind.String(), w.Message})
		}
		d.Steps = append(d.Steps, j)
	}
	if sol != nil {
		sj := &Solution{Goal: goalNames[s.Goal], Measure: s.Measure.Text, Value: Number(sol.Value), Achieved: Number(sol.Measure),
			Bracket: [2]Number{Number(sol.Bracket[0]), Number(sol.Bracket[1])}, Tolerance: Number(sol.Tolerance),
			Iterations: sol.Iterations, AtEdge: sol.AtEdge, OnMagnitude: sol.OnMagnitude}
		if s.Goal == plan.Target {
			sj.Target = ptr(s.Value)
		}
		d.Solution = sj
	}
	return d
}

// WriteStudyCSV writes one row per step of r with the columns cols.
func WriteStudyCSV(w io.Writer, r *study.Result, cols []report.StudyColumn) error {
	cw := csv.NewWriter(w)
	var header []string
	for _, c := range cols {
		header = append(header, c.Key)
	}
	header = append(header, "newton_iterations", "error")
	if err := cw.Write(header); err != nil {
		return err
	}
	for i := range r.Steps {
		st := &r.Steps[i]
		var row []string
		for k, c := range cols {
			if st.Err != nil && k >= report.AxisCount(r) {
				row = append(row, "")
				continue
			}
			row = append(row, strconv.FormatFloat(c.Get(st), 'g', -1, 64))
		}
		e := ""
		if st.Err != nil {
			e = st.Err.Error()
		}
		row = append(row, strconv.Itoa(st.Iterations), e)
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// goalNames are the study goals as the document names them.
var goalNames = map[plan.GoalKind]string{plan.Target: "target", plan.Maximize: "maximize", plan.Minimize: "minimize"}
