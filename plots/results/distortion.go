package results

import (
	"math"
	"math/cmplx"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/ac/steady"
	"qpoint/plots/report"
)

// Contribution is one nonlinearity's share of a distortion product.
type Contribution struct {
	Product string  `json:"product"`
	Diode   string  `json:"diode"`
	Source  string  `json:"source"`
	Phasor  Complex `json:"phasor"`
	Percent Number  `json:"percent"`
}

// Estimate is the Volterra estimate of a distortion run.
type Estimate struct {
	Frequency     Number         `json:"frequency"`
	Fundamental   Number         `json:"fundamental"`
	Linear        Number         `json:"fundamental_linear"`
	GainChangeDB  Number         `json:"gain_change_db"`
	PhaseChange   Number         `json:"phase_change_deg"`
	AMPM          Number         `json:"am_pm_deg_per_db"`
	Series1dB     *SeriesStep    `json:"series_1db,omitempty"`
	HD2dBc        Number         `json:"hd2_dbc"`
	HD3dBc        Number         `json:"hd3_dbc"`
	DCShift       Number         `json:"dc_shift"`
	IM2dBc        *Number        `json:"im2_dbc,omitempty"`
	IM3dBc        *Number        `json:"im3_dbc,omitempty"`
	IIP3dBm       *Number        `json:"iip3_dbm,omitempty"`
	OIP3dBm       *Number        `json:"oip3_dbm,omitempty"`
	IIP2dBm       *Number        `json:"iip2_dbm,omitempty"`
	Contributions []Contribution `json:"contributions"`
}

// SeriesStep is the input level at which the third-order series
// changes the gain at f1 by 1 dB, and whether it compresses or expands.
type SeriesStep struct {
	LevelDBm Number `json:"level_dbm"`
	Kind     string `json:"kind"`
}

// Transfer is a detector's transfer curve: output DC change against
// available input power, with its deviation from square law.
type Transfer struct {
	Sensitivity   Number          `json:"sensitivity"`
	Points        []TransferPoint `json:"points"`
	LowSlope      Number          `json:"low_slope"`
	HighSlope     Number          `json:"high_slope"`
	DeviationDBm  *Number         `json:"deviation_1db_dbm"`
	TangentialDBm *Number         `json:"tangential_sensitivity_dbm"`
	DynamicRange  *Number         `json:"dynamic_range_db"`
}

// TransferPoint is one level of a detector's transfer curve.
type TransferPoint struct {
	LevelDBm    Number `json:"level_dbm"`
	Volts       Number `json:"output"`
	DeviationDB Number `json:"deviation_db"`
}

// TransferOf returns the transfer curve t with the tangential sensitivity tssDBm.
func TransferOf(t *steady.Transfer, tssDBm float64) *Transfer {
	j := &Transfer{Sensitivity: Number(t.SensitivityVPerW), LowSlope: Number(t.LowSlope), HighSlope: Number(t.HighSlope),
		DeviationDBm: ptr(t.DeviationDBm), TangentialDBm: ptr(tssDBm), DynamicRange: ptr(t.DynamicRangeDB(tssDBm))}
	for _, p := range t.Points {
		j.Points = append(j.Points, TransferPoint{Number(p.LevelDBm), Number(p.Volts), Number(p.DeviationDB)})
	}
	return j
}

// Harmonic is one harmonic of the steady-state waveform at the output.
type Harmonic struct {
	Order     int     `json:"order"`
	Amplitude Number  `json:"amplitude"`
	Phase     *Number `json:"phase,omitempty"`
	// BelowFloor marks a waveform reading below the solver's floor.
	BelowFloor bool `json:"below_floor,omitempty"`
}

// Stress is a diode's extremes over the period of a steady state.
type Stress struct {
	Name               string `json:"name"`
	PeakCurrent        Number `json:"peak_current"`
	PeakReverseVoltage Number `json:"peak_reverse_voltage"`
	MeanPower          Number `json:"mean_power"`
}

// Waveform is the periodic steady state at the output: harmonics, THD, stress and method.
type Waveform struct {
	Method     string     `json:"method"`
	Diodes     []Stress   `json:"diodes"`
	Harmonics  []Harmonic `json:"harmonics"`
	THDPercent Number     `json:"thd_percent"`
	Iterations int        `json:"iterations"`
	Residual   Number     `json:"residual"`
	IM2dBc     *Number    `json:"im2_dbc,omitempty"`
	IM3dBc     *Number    `json:"im3_dbc,omitempty"`
	Products   []Product  `json:"products,omitempty"`
}

// Comparison sets the estimate beside the waveform for one product.
type Comparison struct {
	Order     int    `json:"order"`
	Estimate  Number `json:"estimate"`
	Waveform  Number `json:"waveform"`
	DiffDB    Number `json:"difference_db"`
	Trustable bool   `json:"above_floor"`
}

// Level is one level of a level sweep.
type Level struct {
	LevelDBm Number    `json:"level_dbm"`
	Waveform *Waveform `json:"waveform"`
}

// Distortion is `distortion --json`.
type Distortion struct {
	Input              string       `json:"input"`
	Output             string       `json:"output"`
	Frequency          Number       `json:"frequency"`
	LevelDBm           Number       `json:"level_dbm"`
	Estimate           *Estimate    `json:"estimate,omitempty"`
	Waveform           *Waveform    `json:"waveform,omitempty"`
	Comparison         []Comparison `json:"comparison,omitempty"`
	ValidityLimitDBm   *Number      `json:"validity_limit_dbm,omitempty"`
	ValidityLimitFound bool         `json:"validity_limit_found,omitempty"`
	ValidityNote       string       `json:"validity_note,omitempty"`
	LevelSweep         []Level      `json:"level_sweep,omitempty"`
	CompressionDBm     Number       `json:"compression_dbm,omitempty"`
	TwoToneSweep       []Level      `json:"two_tone_sweep,omitempty"`
	MeasuredIntercept  *Intercept   `json:"measured_intercept,omitempty"`
	Transfer           *Transfer    `json:"transfer,omitempty"`
	FrequencySweep     []*Estimate  `json:"frequency_sweep,omitempty"`
	Cautions           []string     `json:"cautions,omitempty"`
}

func ptr(v float64) *Number { n := Number(v); return &n }

// setValidity records the validity search: the limit when one was found
// (or the highest level at which the estimates held, with
// validity_limit_found false), else null with a note that says why.
func (j *Distortion) setValidity(v *steady.Validity) {
	j.ValidityLimitDBm = ptr(v.LevelDBm)
	j.ValidityLimitFound = v.Found()
	if !v.Found() {
		j.ValidityNote = v.Note()
	}
}

// EstimateOf returns the document's form of the estimate e.
func EstimateOf(e *ac.Estimate) *Estimate {
	j := &Estimate{
		Frequency:    Number(e.Drive.FrequencyHz),
		Fundamental:  Number(cmplx.Abs(e.Fundamental)),
		Linear:       Number(cmplx.Abs(e.Linear)),
		GainChangeDB: Number(e.GainChangeDB()),
		PhaseChange:  Number(e.PhaseChangeDeg()),
		AMPM:         Number(e.AMPMDegPerDB()),
		HD2dBc:       Number(e.HD2dBc()),
		HD3dBc:       Number(e.HD3dBc()),
		DCShift:      Number(e.DCShift),
	}
	if l, compress := e.GainStepDBm(1); !math.IsNaN(l) {
		kind := "expansion"
		if compress {
			kind = "compression"
		}
		j.Series1dB = &SeriesStep{Number(l), kind}
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
	j.Contributions = []Contribution{}
	for _, c := range e.Contributions {
		j.Contributions = append(j.Contributions, Contribution{string(c.Product), c.Diode, string(c.Source), Complex(c.Phasor), Number(c.Percent)})
	}
	return j
}

// WaveformOf returns the document's form of the steady state s.
func WaveformOf(s *steady.State) *Waveform {
	j := &Waveform{Method: s.Method, THDPercent: Number(s.THDPercent), Iterations: s.Iterations, Residual: Number(s.Residual), Diodes: []Stress{}}
	for _, d := range s.Stress {
		j.Diodes = append(j.Diodes, Stress{d.Name, Number(d.PeakCurrent), Number(d.PeakReverseVoltage), Number(d.MeanPower)})
	}
	for _, h := range s.Output {
		hj := Harmonic{Order: h.Order, Amplitude: Number(h.Amplitude), BelowFloor: h.BelowFloor}
		if h.Order > 0 {
			hj.Phase = ptr(h.PhaseDeg)
		}
		j.Harmonics = append(j.Harmonics, hj)
	}
	return j
}

// Product is one mixing product of the two-tone waveform.
type Product struct {
	Orders    [2]int `json:"orders"`
	Frequency Number `json:"frequency"`
	Amplitude Number `json:"amplitude"`
	Phase     Number `json:"phase"`
}

// addTwoTone puts the two-tone steady state's products into the waveform
// document.
func (j *Waveform) addTwoTone(st *steady.State) {
	j.IM2dBc = ptr(st.IM2dBc())
	j.IM3dBc = ptr(st.IM3dBc())
	j.Products = []Product{}
	for _, p := range st.Products {
		j.Products = append(j.Products, Product{p.Orders, Number(p.FrequencyHz), Number(p.Amplitude), Number(p.PhaseDeg)})
	}
}

// Intercept is the measured-style intercept of a two-tone sweep.
type Intercept struct {
	IIP3DBm     Number  `json:"iip3_dbm"`
	OIP3DBm     *Number `json:"oip3_dbm"`
	Slope       Number  `json:"im3_slope_db_per_db"`
	FromDBm     Number  `json:"from_dbm"`
	ToDBm       Number  `json:"to_dbm"`
	LevelsFound int     `json:"levels_used"`
}

// InterceptOf returns the intercept measured on the two-tone waveforms.
func InterceptOf(ip *steady.Intercept) *Intercept {
	j := &Intercept{IIP3DBm: Number(ip.IIP3DBm), Slope: Number(ip.Slope), FromDBm: Number(ip.FromDBm), ToDBm: Number(ip.ToDBm), LevelsFound: ip.Levels}
	if !math.IsNaN(ip.OIP3DBm) {
		j.OIP3DBm = ptr(ip.OIP3DBm)
	}
	return j
}

// DistortionHead is the JSON document's drive.
func DistortionHead(d *plan.Drive) *Distortion {
	return &Distortion{Input: d.InputName, Output: d.OutputName, Frequency: Number(d.FrequencyHz), LevelDBm: Number(d.LevelDBm)}
}

// DistortionOf is the JSON document of a distortion run.
func DistortionOf(d *plan.Drive, res *plan.Distortion) *Distortion {
	doc := DistortionHead(d)
	doc.Estimate = EstimateOf(res.Estimate)
	doc.Waveform = WaveformOf(res.Waveform)
	doc.Cautions = append([]string{}, res.Waveform.Cautions()...)
	doc.Cautions = append(doc.Cautions, report.OutsideMessages(res.Outside())...)
	if note := report.TruncationNote(res.Waveform); note != "" {
		doc.Cautions = append(doc.Cautions, note)
	}
	for _, c := range res.Comparison {
		doc.Comparison = append(doc.Comparison, Comparison{c.Order, Number(c.Estimate), Number(c.Waveform), Number(c.DiffDB), c.Trustable})
	}
	if two := res.TwoTone; two != nil {
		doc.Waveform.addTwoTone(two)
		doc.Cautions = append(doc.Cautions, two.Cautions()...)
		if note := report.TruncationNote(two); note != "" {
			doc.Cautions = append(doc.Cautions, note)
		}
	}
	if res.Validity != nil {
		doc.setValidity(res.Validity)
	}
	if res.Compressed {
		doc.CompressionDBm = Number(res.CompressionDBm)
	}
	for _, p := range res.Sweep {
		doc.LevelSweep = append(doc.LevelSweep, Level{Number(p.LevelDBm), WaveformOf(p.Steady)})
	}
	doc.Cautions = append(doc.Cautions, report.SweepCautions(res.Sweep)...)
	if res.Transfer != nil {
		doc.Transfer = TransferOf(res.Transfer, res.TangentialDBm)
	}
	for _, p := range res.TwoToneSweep {
		w := WaveformOf(p.Steady)
		w.addTwoTone(p.Steady)
		doc.TwoToneSweep = append(doc.TwoToneSweep, Level{Number(p.LevelDBm), w})
	}
	if res.TwoToneSweep != nil && res.InterceptErr == nil {
		doc.MeasuredIntercept = InterceptOf(res.Intercept)
	}
	return doc
}

// DistortionFrequencyOf is the JSON document of the estimate swept over
// frequency: the drive and an estimate per frequency.
func DistortionFrequencyOf(d *plan.Drive, rows []report.FrequencyRow) *Distortion {
	doc := DistortionHead(d)
	for _, r := range rows {
		doc.FrequencySweep = append(doc.FrequencySweep, EstimateOf(r.Estimate))
	}
	return doc
}
