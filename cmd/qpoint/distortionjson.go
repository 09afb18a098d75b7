package main

import (
	"math"
	"math/cmplx"

	"qpoint/ac"
	"qpoint/ac/steady"
)

type contributionJSON struct {
	Product string      `json:"product"`
	Diode   string      `json:"diode"`
	Source  string      `json:"source"`
	Phasor  complexJSON `json:"phasor"`
	Percent number      `json:"percent"`
}

type estimateJSON struct {
	Frequency     number             `json:"frequency"`
	Fundamental   number             `json:"fundamental"`
	Linear        number             `json:"fundamental_linear"`
	GainChangeDB  number             `json:"gain_change_db"`
	PhaseChange   number             `json:"phase_change_deg"`
	AMPM          number             `json:"am_pm_deg_per_db"`
	Series1dB     *seriesStepJSON    `json:"series_1db,omitempty"`
	HD2dBc        number             `json:"hd2_dbc"`
	HD3dBc        number             `json:"hd3_dbc"`
	DCShift       number             `json:"dc_shift"`
	IM2dBc        *number            `json:"im2_dbc,omitempty"`
	IM3dBc        *number            `json:"im3_dbc,omitempty"`
	IIP3dBm       *number            `json:"iip3_dbm,omitempty"`
	OIP3dBm       *number            `json:"oip3_dbm,omitempty"`
	IIP2dBm       *number            `json:"iip2_dbm,omitempty"`
	Contributions []contributionJSON `json:"contributions"`
}

// seriesStepJSON is the input level at which the third-order series
// changes the gain at f1 by 1 dB, and whether it compresses or expands.
type seriesStepJSON struct {
	LevelDBm number `json:"level_dbm"`
	Kind     string `json:"kind"`
}

// transferJSON is a detector's transfer curve: output DC change against
// available input power, with its deviation from square law.
type transferJSON struct {
	Sensitivity   number              `json:"sensitivity"`
	Points        []transferPointJSON `json:"points"`
	LowSlope      number              `json:"low_slope"`
	HighSlope     number              `json:"high_slope"`
	DeviationDBm  *number             `json:"deviation_1db_dbm"`
	TangentialDBm *number             `json:"tangential_sensitivity_dbm"`
	DynamicRange  *number             `json:"dynamic_range_db"`
}

type transferPointJSON struct {
	LevelDBm    number `json:"level_dbm"`
	Volts       number `json:"output"`
	DeviationDB number `json:"deviation_db"`
}

func transferJSONOf(t *steady.Transfer, tssDBm float64) *transferJSON {
	j := &transferJSON{Sensitivity: number(t.SensitivityVPerW), LowSlope: number(t.LowSlope), HighSlope: number(t.HighSlope),
		DeviationDBm: ptr(t.DeviationDBm), TangentialDBm: ptr(tssDBm), DynamicRange: ptr(t.DynamicRangeDB(tssDBm))}
	for _, p := range t.Points {
		j.Points = append(j.Points, transferPointJSON{number(p.LevelDBm), number(p.Volts), number(p.DeviationDB)})
	}
	return j
}

type harmonicJSON struct {
	Order     int     `json:"order"`
	Amplitude number  `json:"amplitude"`
	Phase     *number `json:"phase,omitempty"`
	// BelowFloor marks a waveform reading below the solver's floor.
	BelowFloor bool `json:"below_floor,omitempty"`
}

// stressJSON is a diode's extremes over the period of a steady state.
type stressJSON struct {
	Name               string `json:"name"`
	PeakCurrent        number `json:"peak_current"`
	PeakReverseVoltage number `json:"peak_reverse_voltage"`
	MeanPower          number `json:"mean_power"`
}

type waveformJSON struct {
	Method     string         `json:"method"`
	Diodes     []stressJSON   `json:"diodes"`
	Harmonics  []harmonicJSON `json:"harmonics"`
	THDPercent number         `json:"thd_percent"`
	Iterations int            `json:"iterations"`
	Residual   number         `json:"residual"`
	IM2dBc     *number        `json:"im2_dbc,omitempty"`
	IM3dBc     *number        `json:"im3_dbc,omitempty"`
	Products   []productJSON  `json:"products,omitempty"`
}

type comparisonJSON struct {
	Order     int    `json:"order"`
	Estimate  number `json:"estimate"`
	Waveform  number `json:"waveform"`
	DiffDB    number `json:"difference_db"`
	Trustable bool   `json:"above_floor"`
}

type levelJSON struct {
	LevelDBm number        `json:"level_dbm"`
	Waveform *waveformJSON `json:"waveform"`
}

type distortionJSON struct {
	Input              string           `json:"input"`
	Output             string           `json:"output"`
	Frequency          number           `json:"frequency"`
	LevelDBm           number           `json:"level_dbm"`
	Estimate           *estimateJSON    `json:"estimate,omitempty"`
	Waveform           *waveformJSON    `json:"waveform,omitempty"`
	Comparison         []comparisonJSON `json:"comparison,omitempty"`
	ValidityLimitDBm   *number          `json:"validity_limit_dbm,omitempty"`
	ValidityLimitFound bool             `json:"validity_limit_found,omitempty"`
	ValidityNote       string           `json:"validity_note,omitempty"`
	LevelSweep         []levelJSON      `json:"level_sweep,omitempty"`
	CompressionDBm     number           `json:"compression_dbm,omitempty"`
	TwoToneSweep       []levelJSON      `json:"two_tone_sweep,omitempty"`
	MeasuredIntercept  *interceptJSON   `json:"measured_intercept,omitempty"`
	Transfer           *transferJSON    `json:"transfer,omitempty"`
	FrequencySweep     []*estimateJSON  `json:"frequency_sweep,omitempty"`
	Cautions           []string         `json:"cautions,omitempty"`
}

func ptr(v float64) *number { n := number(v); return &n }

// setValidity records the validity search: the limit when one was found
// (or the highest level at which the estimates held, with
// validity_limit_found false), else null with a note that says why.
func (j *distortionJSON) setValidity(v *steady.Validity) {
	j.ValidityLimitDBm = ptr(v.LevelDBm)
	j.ValidityLimitFound = v.Found()
	if !v.Found() {
		j.ValidityNote = v.Note()
	}
}

func estimateJSONOf(e *ac.Estimate) *estimateJSON {
	j := &estimateJSON{
		Frequency:    number(e.Drive.FrequencyHz),
		Fundamental:  number(cmplx.Abs(e.Fundamental)),
		Linear:       number(cmplx.Abs(e.Linear)),
		GainChangeDB: number(e.GainChangeDB()),
		PhaseChange:  number(e.PhaseChangeDeg()),
		AMPM:         number(e.AMPMDegPerDB()),
		HD2dBc:       number(e.HD2dBc()),
		HD3dBc:       number(e.HD3dBc()),
		DCShift:      number(e.DCShift),
	}
	if l, compress := e.GainStepDBm(1); !math.IsNaN(l) {
		kind := "expansion"
		if compress {
			kind = "compression"
		}
		j.Series1dB = &seriesStepJSON{number(l), kind}
	}
	if e.Drive.SecondToneHz != 0 {
		j.IM2dBc = ptr(e.IM2dBc())
		j.IM3dBc = ptr(e.IM3dBc())
		j.IIP3dBm = ptr(e.IIP3dBm())
		if o, ok := e.OIP3dBm(); ok {
			j.OIP3dBm = ptr(o)
		}
		j.IIP2dBm = ptr(e.IIP2dBm())
	}
	j.Contributions = []contributionJSON{}
	for _, c := range e.Contributions {
		j.Contributions = append(j.Contributions, contributionJSON{string(c.Product), c.Diode, string(c.Source), complexJSON(c.Phasor), number(c.Percent)})
	}
	return j
}

func waveformJSONOf(s *steady.State) *waveformJSON {
	j := &waveformJSON{Method: s.Method, THDPercent: number(s.THDPercent), Iterations: s.Iterations, Residual: number(s.Residual), Diodes: []stressJSON{}}
	for _, d := range s.Stress {
		j.Diodes = append(j.Diodes, stressJSON{d.Name, number(d.PeakCurrent), number(d.PeakReverseVoltage), number(d.MeanPower)})
	}
	for _, h := range s.Output {
		hj := harmonicJSON{Order: h.Order, Amplitude: number(h.Amplitude), BelowFloor: h.BelowFloor}
		if h.Order > 0 {
			hj.Phase = ptr(h.PhaseDeg)
		}
		j.Harmonics = append(j.Harmonics, hj)
	}
	return j
}
