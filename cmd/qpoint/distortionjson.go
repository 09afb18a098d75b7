package main

import (
	"math/cmplx"

	"qpoint/ac"
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

type harmonicJSON struct {
	Order     int     `json:"order"`
	Amplitude number  `json:"amplitude"`
	Phase     *number `json:"phase,omitempty"`
}

type waveformJSON struct {
	Method     string         `json:"method"`
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
	ValidityLimitDBm   number           `json:"validity_limit_dbm,omitempty"`
	ValidityLimitFound bool             `json:"validity_limit_found,omitempty"`
	LevelSweep         []levelJSON      `json:"level_sweep,omitempty"`
	CompressionDBm     number           `json:"compression_dbm,omitempty"`
	TwoToneSweep       []levelJSON      `json:"two_tone_sweep,omitempty"`
	MeasuredIntercept  *interceptJSON   `json:"measured_intercept,omitempty"`
	FrequencySweep     []*estimateJSON  `json:"frequency_sweep,omitempty"`
	Cautions           []string         `json:"cautions,omitempty"`
}

func ptr(v float64) *number { n := number(v); return &n }

func estimateJSONOf(e *ac.Estimate) *estimateJSON {
	j := &estimateJSON{
		Frequency:   number(e.Drive.FrequencyHz),
		Fundamental: number(cmplx.Abs(e.Fundamental)),
		HD2dBc:      number(e.HD2dBc()),
		HD3dBc:      number(e.HD3dBc()),
		DCShift:     number(e.DCShift),
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

func waveformJSONOf(s *ac.Steady) *waveformJSON {
	j := &waveformJSON{Method: s.Method, THDPercent: number(s.THDPercent), Iterations: s.Iterations, Residual: number(s.Residual)}
	for _, h := range s.Output {
		hj := harmonicJSON{Order: h.Order, Amplitude: number(h.Amplitude)}
		if h.Order > 0 {
			hj.Phase = ptr(h.PhaseDeg)
		}
		j.Harmonics = append(j.Harmonics, hj)
	}
	return j
}
