package extract

import (
	"fmt"
	"math"
	"time"

	"qpoint/bias/diode"
	"qpoint/bias/measured"
)

// Minimum counts of points.
const (
	// MinForward is the fewest forward I–V points fitted: three values and
	// two degrees of freedom left for the residual variance.
	MinForward = 5
	// MinCapacitance is the fewest C–V points fitted.
	MinCapacitance = 5
	// minBreakdown is the fewest points in breakdown for a knee fit.
	minBreakdown = 3
)

// Data are the measured points to fit.
type Data struct {
	// Current holds I–V points: Value is the current in A, positive from
	// anode to cathode. Points at forward voltage feed the forward fit,
	// points at reverse voltage the breakdown fit.
	Current []measured.Point
	// Capacitance holds C–V points: Value is the capacitance in F.
	Capacitance []measured.Point
}

// Settings say how to fit. The zero value is ready to use.
type Settings struct {
	// TemperatureK is the temperature of points that carry none (a file
	// without a temperature column) [300.15 K].
	TemperatureK float64
	// MeasuredAtK is T0, the temperature the model's values hold at
	// (measured_at) [the I–V points' temperature nearest 300.15 K].
	MeasuredAtK float64
	// Defaults are the values kept where the data do not determine one
	// [diode.Defaults()]. Its Ideality must be set for it to be used.
	Defaults diode.Params
	// CurrentFloor is the meter's absolute current resolution in A; it
	// lowers the weight of currents near it [0].
	CurrentFloor float64
	// MaxIterations bounds each Levenberg–Marquardt fit [200].
	MaxIterations int
}

// Status says where a value of the result comes from.
type Status int

const (
	// Fitted: determined by the data, with a standard error.
	Fitted Status = iota + 1
	// Default: the data do not determine it (a Caution says why); the
	// default is kept.
	Default
	// Chosen: set by the method within the data's range, not fitted
	// (the breakdown current at which the knee voltage is fitted).
	Chosen
	// Given: taken from the settings or the data's temperatures
	// (measured_at).
	Given
)

// String names the status as JSON and tables print it.
func (s Status) String() string {
	switch s {
	case Fitted:
		return "fitted"
	case Default:
		return "default"
	case Chosen:
		return "chosen"
	case Given:
		return "given"
	}
	return "unknown"
}

// Value is one model value of the result.
type Value struct {
	Key    string  // the circuit file's key, e.g. saturation_current
	Value  float64 // in SI units (electronvolts for gap_energy, kelvin for measured_at)
	Error  float64 // standard error; NaN unless Fitted
	Unit   string  // "A", "ohm", "F", "V", "eV", "K" or "" for a number
	Status Status
}

// Correlation is the correlation coefficient of two fitted values.
type Correlation struct {
	A, B        string // circuit-file keys
	Coefficient float64
}

// CautionKind classifies a Caution.
type CautionKind int

const (
	// NotDetermined: the data do not determine a value; its default is
	// kept.
	NotDetermined CautionKind = iota + 1
	// PointLeftOut: a point that cannot enter the fit (a zero current on a
	// logarithmic scale) was left out.
	PointLeftOut
	// Systematic: the residuals run in long stretches of one sign: the law
	// does not describe the data over their whole range (recombination
	// current at low bias, self-heating or high injection at high current,
	// a parasitic capacitance in parallel).
	Systematic
	// StrongCorrelation: two fitted values are correlated so strongly that
	// each is uncertain alone while the pair is well determined.
	StrongCorrelation
	// LeakageAboveModel: measured reverse current below breakdown exceeds
	// the model's saturation current many times over; the model has no
	// other leakage path.
	LeakageAboveModel
	// BreakdownShape: the measured knee is softer or sharper than the
	// model's, whose slope is fixed at n V_T per e-fold.
	BreakdownShape
	// OutsideLaw: points lie where the model's law is continued rather
	// than physical (C–V points forward of V_bi/2), or a value sits at the
	// edge of the range the circuit file accepts.
	OutsideLaw
)

// String names the kind as JSON and tables print it.
func (k CautionKind) String() string {
	switch k {
	case NotDetermined:
		return "not-determined"
	case PointLeftOut:
		return "point-left-out"
	case Systematic:
		return "systematic-residuals"
	case StrongCorrelation:
		return "strong-correlation"
	case LeakageAboveModel:
		return "leakage-above-model"
	case BreakdownShape:
		return "breakdown-shape"
	case OutsideLaw:
		return "outside-law"
	}
	return "unknown"
}

// Caution is a typed remark about the fit.
type Caution struct {
	Kind CautionKind
	// Key is the model value concerned, "" when none.
	Key string
	// Set and Index place a caution about one point: the point
	// Data.Current[Index] or Data.Capacitance[Index]; Index is -1 when
	// the caution is not about one point.
	Set     measured.Kind
	Index   int
	Message string
}

// Residual is one fitted point beside the model.
type Residual struct {
	Index        int     // index into Data.Current or Data.Capacitance
	Voltage      float64 // V
	Measured     float64 // A or F (for reverse points the current is negative)
	Model        float64 // the model's value at the point
	TemperatureK float64
	// Residual is ln(Model/Measured), the relative error the fit
	// minimises.
	Residual float64
}

// Residuals are the root-mean-square residuals ln(model/measured) of each
// set of points fitted; NaN for a set with no points.
type Residuals struct {
	Forward, Breakdown, Capacitance float64
	All                             float64 // over every fitted point
}

// Stats say what the fit did.
type Stats struct {
	Iterations  int // Levenberg–Marquardt iterations, all I–V fits together
	Evaluations int // evaluations of the I–V residuals
	// CapacitanceEvaluations counts evaluations of the C–V objective by
	// gonum/optimize; CapacitanceStatus is how its last run ended.
	CapacitanceEvaluations int
	CapacitanceStatus      string
	// ForwardStep and CapacitanceStep are how far the final values lie
	// from the least-squares optimum: the length of one more Gauss–Newton
	// step, in standard errors (a fit is accepted below 1e-3).
	ForwardStep, CapacitanceStep float64
	// Refits counts the fits repeated after a value was put back to its
	// default.
	Refits  int
	Runtime time.Duration
}

// Result is a fitted diode model.
type Result struct {
	// Model holds the fitted values, with the defaults elsewhere; it is
	// ready for a circuit.
	Model diode.Params
	// Values lists every value the fit concerns, in the circuit file's key
	// order, with its standard error and status.
	Values       []Value
	Correlations []Correlation
	Residuals    Residuals
	// Forward, Breakdown and Capacitance are the points each fit used.
	Forward, Breakdown, Capacitance []Residual
	// Reverse holds every reverse I–V point at measured_at beside the
	// final model, those below breakdown (not fitted) included.
	Reverse []Residual
	// Temperatures are the distinct temperatures of the forward points, in
	// kelvin, rising.
	Temperatures []float64
	Cautions     []Caution
	Stats        Stats

	found map[string]Value // the breakdown and C–V values, by key
}

// Value returns the value with the circuit-file key, or nil.
func (r *Result) Value(key string) *Value {
	for i := range r.Values {
		if r.Values[i].Key == key {
			return &r.Values[i]
		}
	}
	return nil
}

// CurrentAt returns the model's terminal current at voltage v and
// temperature tempK (diode.Device.TerminalCurrent).
func (r *Result) CurrentAt(v, tempK float64) float64 {
	i, _ := diode.New(r.Model, tempK).TerminalCurrent(v)
	return i
}

// CapacitanceAt returns the model's junction capacitance at terminal
// voltage v and temperature tempK: dq/dv at the junction voltage.
func (r *Result) CapacitanceAt(v, tempK float64) float64 {
	return capacitanceAt(diode.New(r.Model, tempK), v)
}

// DataError is a problem with the data as given, such as too few points.
type DataError struct {
	Set measured.Kind
	// Index is the point the problem is found at (for too few points the
	// last one of the set), -1 for none.
	Index int
	Msg   string // what is wrong; what is accepted
}

func (e *DataError) Error() string { return e.Msg }

// Fit finds the diode model that best describes d. The returned error is a
// *DataError when the data cannot be fitted as given, and otherwise says
// which fit failed.
func Fit(d Data, s Settings) (*Result, error) {
	begin := time.Now()
	s = s.withDefaults()
	if err := check(d); err != nil {
		return nil, err
	}
	r := &Result{found: map[string]Value{}}
	fw, err := fitForward(d, s, r)
	if err != nil {
		return nil, err
	}
	model := fw.model
	fitBreakdown(d, s, fw, &model, r)
	if len(d.Capacitance) > 0 {
		if err := fitCapacitance(d, s, &model, r); err != nil {
			return nil, err
		}
	} else {
		for _, k := range []string{"zero_bias_capacitance", "built_in_potential", "grading_coefficient"} {
			r.caution(NotDetermined, k, -1, fmt.Sprintf("no C–V points: %s left at its default", k))
		}
	}
	r.Model = model
	r.values(fw)
	r.reverse(d, s)
	if len(d.Capacitance) == 0 {
		r.Stats.CapacitanceStep = math.NaN()
	}
	r.Residuals = Residuals{Forward: rms(r.Forward), Breakdown: rms(r.Breakdown), Capacitance: rms(r.Capacitance),
		All: rms(append(append(append([]Residual(nil), r.Forward...), r.Breakdown...), r.Capacitance...))}
	r.Stats.Runtime = time.Since(begin)
	return r, nil
}

func (s Settings) withDefaults() Settings {
	if !(s.TemperatureK > 0) {
		s.TemperatureK = diode.ZeroCelsius + 27
	}
	if s.Defaults.Ideality == 0 {
		s.Defaults = diode.Defaults()
	}
	if s.MaxIterations <= 0 {
		s.MaxIterations = 200
	}
	return s
}

// check refuses points no fit can take: not finite, a current against the
// sign of its voltage, a capacitance not above zero, a temperature not
// above zero.
func check(d Data) error {
	for i, p := range d.Current {
		msg := ""
		switch {
		case !finite(p.Voltage) || !finite(p.Value) || !finite(p.TemperatureK) || p.TemperatureK < 0:
			msg = fmt.Sprintf("voltage %g V, current %g A, temperature %g K: a point that is not finite or has a negative temperature; accepted: finite values, temperatures above zero (or zero for the settings' temperature)", p.Voltage, p.Value, p.TemperatureK)
		case p.Voltage*p.Value < 0:
			msg = fmt.Sprintf("current %.6g A at %.6g V: a junction's current has the sign of its voltage; accepted: positive currents at forward voltages, negative at reverse", p.Value, p.Voltage)
		}
		if msg != "" {
			return &DataError{Set: measured.CurrentVoltage, Index: i, Msg: at(p) + msg}
		}
	}
	for i, p := range d.Capacitance {
		if !finite(p.Voltage) || !(p.Value > 0) || !finite(p.Value) || !finite(p.TemperatureK) || p.TemperatureK < 0 {
			return &DataError{Set: measured.CapacitanceVoltage, Index: i, Msg: at(p) + fmt.Sprintf("capacitance %.6g F at %.6g V; accepted: finite voltages and capacitances above zero", p.Value, p.Voltage)}
		}
	}
	return nil
}

func at(p measured.Point) string {
	if p.Line > 0 {
		return fmt.Sprintf("line %d: ", p.Line)
	}
	return ""
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func (r *Result) caution(k CautionKind, key string, index int, msg string) {
	set := measured.Kind(0)
	if index >= 0 {
		set = measured.CurrentVoltage
	}
	r.Cautions = append(r.Cautions, Caution{Kind: k, Key: key, Set: set, Index: index, Message: msg})
}

func rms(rs []Residual) float64 {
	if len(rs) == 0 {
		return math.NaN()
	}
	s := 0.0
	for _, r := range rs {
		s += r.Residual * r.Residual
	}
	return math.Sqrt(s / float64(len(rs)))
}

// tempOf is a point's temperature, or the settings' for a point without.
func (s Settings) tempOf(p measured.Point) float64 {
	if p.TemperatureK > 0 {
		return p.TemperatureK
	}
	return s.TemperatureK
}

// keyOrder lists the values a fit reports, in the circuit file's order,
// with their units.
var keyOrder = []struct{ key, unit string }{
	{"saturation_current", "A"}, {"ideality", ""}, {"series_resistance", "ohm"},
	{"zero_bias_capacitance", "F"}, {"built_in_potential", "V"}, {"grading_coefficient", ""},
	{"breakdown_voltage", "V"}, {"breakdown_current", "A"},
	{"gap_energy", "eV"}, {"saturation_temperature_exponent", ""}, {"measured_at", "K"},
}

// values lists the result's values from the fits, in key order.
func (r *Result) values(fw *forwardFit) {
	for c := range nForward {
		r.found[forwardKeys[c]] = Value{Error: fw.errs[c], Status: fw.status[c]}
	}
	for _, k := range []string{"zero_bias_capacitance", "built_in_potential", "grading_coefficient"} {
		if _, ok := r.found[k]; !ok {
			r.found[k] = Value{Error: math.NaN(), Status: Default}
		}
	}
	r.found["measured_at"] = Value{Error: math.NaN(), Status: Given}
	m := r.Model
	current := map[string]float64{
		"saturation_current": m.SaturationCurrent, "ideality": m.Ideality, "series_resistance": m.SeriesResistance,
		"zero_bias_capacitance": m.ZeroBiasCapacitance, "built_in_potential": m.BuiltInPotential, "grading_coefficient": m.Grading,
		"breakdown_voltage": m.BreakdownVoltage, "breakdown_current": m.BreakdownCurrent,
		"gap_energy": m.GapEnergy, "saturation_temperature_exponent": m.SaturationExponent, "measured_at": m.MeasuredAtK,
	}
	for _, k := range keyOrder {
		v := r.found[k.key]
		v.Key, v.Unit, v.Value = k.key, k.unit, current[k.key]
		r.Values = append(r.Values, v)
	}
}

// reverse sets the reverse points at measured_at beside the final model.
func (r *Result) reverse(d Data, s Settings) {
	t0 := r.Model.MeasuredAtK
	dev := diode.New(r.Model, t0)
	for k, p := range d.Current {
		if p.Voltage >= 0 || p.Value == 0 || s.tempOf(p) != t0 {
			continue
		}
		i, _ := dev.TerminalCurrent(p.Voltage)
		r.Reverse = append(r.Reverse, Residual{Index: k, Voltage: p.Voltage, Measured: p.Value, Model: i,
			TemperatureK: t0, Residual: math.Log(i / p.Value)})
	}
}
