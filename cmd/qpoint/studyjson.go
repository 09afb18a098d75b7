package main

import (
	"qpoint/ac/study"
	"qpoint/plots/report"
)

type studyDiodeJSON struct {
	Name                 string   `json:"name"`
	Current              number   `json:"current"`
	Voltage              number   `json:"voltage"`
	DynamicResistance    number   `json:"dynamic_resistance"`
	JunctionCapacitance  number   `json:"junction_capacitance"`
	DiffusionCapacitance number   `json:"diffusion_capacitance"`
	VideoResistance      number   `json:"video_resistance"`
	CurrentSensitivity   []number `json:"current_sensitivity"`
	VoltageSensitivity   []number `json:"voltage_sensitivity"`
}

type studyResponseJSON struct {
	Frequency      number          `json:"frequency"`
	S              [][]complexJSON `json:"s"`
	InputImpedance []complexJSON   `json:"input_impedance"`
	Probes         orderedComplex  `json:"probes"`
}

type studyStepJSON struct {
	Values      []number              `json:"values"`
	Iterations  int                   `json:"iterations"`
	Diodes      []studyDiodeJSON      `json:"diodes"`
	Responses   []studyResponseJSON   `json:"responses"`
	Distortion  []studyDistortionJSON `json:"distortion,omitempty"`
	NoiseFigure []number              `json:"noise_figure_db,omitempty"`
	NEP         *number               `json:"nep,omitempty"`
	TSSdBm      *number               `json:"tangential_sensitivity_dbm,omitempty"`
	HD2dBc      *number               `json:"hd2_dbc,omitempty"`
	HD3dBc      *number               `json:"hd3_dbc,omitempty"`
	DCShift     *number               `json:"dc_shift,omitempty"`
	Sensitivity *number               `json:"sensitivity,omitempty"`
	Warnings    []warningJSON         `json:"warnings"`
	Error       string                `json:"error,omitempty"`
}

type studyDistortionJSON struct {
	Frequency   number `json:"frequency"`
	Fundamental number `json:"fundamental"`
	HD2dBc      number `json:"hd2_dbc"`
	HD3dBc      number `json:"hd3_dbc"`
	DCShift     number `json:"dc_shift"`
	Sensitivity number `json:"sensitivity"`
}

type solutionJSON struct {
	Goal       string    `json:"goal"`
	Measure    string    `json:"measure"`
	Target     *number   `json:"target,omitempty"`
	Value      number    `json:"value"`
	Achieved   number    `json:"achieved"`
	Bracket    [2]number `json:"bracket"`
	Tolerance  number    `json:"tolerance"`
	Iterations int       `json:"iterations"`
	AtEdge     bool      `json:"at_edge"`
	// OnMagnitude: the optimisation compared |measure|, its sign being a
	// polarity; achieved keeps the sign.
	OnMagnitude bool `json:"on_magnitude,omitempty"`
}

type studyJSON struct {
	Vary     []string        `json:"vary"`
	Shape    [2]int          `json:"shape"`
	Newton   int             `json:"newton_iterations"`
	Steps    []studyStepJSON `json:"steps"`
	Solution *solutionJSON   `json:"solution,omitempty"`
	Columns  []string        `json:"columns"`
}

func studyDocument(r *study.Result, cols []report.StudyColumn, s *studySetup, sol *study.Solution) *studyJSON {
	d := &studyJSON{Vary: []string{r.Settings.Axis.Vary.Text}, Shape: r.Shape, Newton: r.Newton}
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
		j := studyStepJSON{Iterations: st.Iterations, Diodes: []studyDiodeJSON{}, Responses: []studyResponseJSON{}, Warnings: []warningJSON{}}
		j.Values = append(j.Values, number(st.Values[0]))
		if r.Settings.Second != nil {
			j.Values = append(j.Values, number(st.Values[1]))
		}
		if st.Err != nil {
			j.Error = st.Err.Error()
			d.Steps = append(d.Steps, j)
			continue
		}
		for _, x := range st.Diodes {
			dj := studyDiodeJSON{Name: x.Name, Current: number(x.Current), Voltage: number(x.Voltage),
				DynamicResistance: number(x.DynamicResistance), JunctionCapacitance: number(x.JunctionCapacitance),
				DiffusionCapacitance: number(x.DiffusionCapacitance), VideoResistance: number(x.VideoResistance)}
			for k := range x.CurrentSensitivity {
				dj.CurrentSensitivity = append(dj.CurrentSensitivity, number(x.CurrentSensitivity[k]))
				dj.VoltageSensitivity = append(dj.VoltageSensitivity, number(x.VoltageSensitivity[k]))
			}
			j.Diodes = append(j.Diodes, dj)
		}
		for _, resp := range st.Responses {
			rj := studyResponseJSON{Frequency: number(resp.FrequencyHz)}
			rj.S, rj.InputImpedance, rj.Probes = networkJSON(resp.S, resp.InputImpedance, r.Probes, resp.Probes)
			j.Responses = append(j.Responses, rj)
		}
		for k, x := range st.Distortion {
			j.Distortion = append(j.Distortion, studyDistortionJSON{number(x.FrequencyHz), number(x.Fundamental),
				number(x.HD2dBc), number(x.HD3dBc), number(x.DCShift), number(x.Sensitivity)})
			if k == 0 {
				// The first distortion frequency's figures also at the
				// step's top level, where earlier versions put them.
				j.HD2dBc, j.HD3dBc, j.DCShift, j.Sensitivity = ptr(x.HD2dBc), ptr(x.HD3dBc), ptr(x.DCShift), ptr(x.Sensitivity)
			}
		}
		for _, nf := range st.NoiseFigureDB {
			j.NoiseFigure = append(j.NoiseFigure, number(nf))
		}
		if r.Settings.Detector != nil {
			d := report.Detection(st)
			j.NEP, j.TSSdBm = ptr(d.NEP), ptr(d.TangentialDBm)
		}
		for _, w := range st.Warnings {
			j.Warnings = append(j.Warnings, warningJSON{w.Part, w.Kind.String(), w.Message})
		}
		d.Steps = append(d.Steps, j)
	}
	if sol != nil {
		sj := &solutionJSON{Goal: s.goal, Measure: s.measure.Text, Value: number(sol.Value), Achieved: number(sol.Measure),
			Bracket: [2]number{number(sol.Bracket[0]), number(sol.Bracket[1])}, Tolerance: number(sol.Tolerance),
			Iterations: sol.Iterations, AtEdge: sol.AtEdge, OnMagnitude: sol.OnMagnitude}
		if s.goal == "target" {
			sj.Target = ptr(s.value)
		}
		d.Solution = sj
	}
	return d
}
