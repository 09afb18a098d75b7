package diode

import (
	"fmt"
	"math"
)

// depletionKnee is the fraction of V_bi up to which the depletion charge
// follows the textbook law exactly; above it the capacitance continues as a
// quadratic that matches C_j, dC_j/dv and d²C_j/dv² at the knee, so charge,
// capacitance and their first two derivatives stay continuous as the
// junction nears and passes V_bi, where the textbook law has a pole.
const depletionKnee = 0.5

// MaxLawCurrent bounds the current a junction law may imply. Beyond the
// junction voltage where I_S e^(v/nV_T) (or the breakdown knee's
// I_BV e^(u/nV_T)) reaches it, the law continues along its tangent, so that
// a Newton iterate far from any solution cannot overflow. The bound is set
// by the current, not by a fixed argument of the exponential: at 10 K a
// silicon junction needs e^1280 I_S to carry a milliampere, and a fixed
// bound on the argument would cut the law off long before any current
// flows. No circuit within the documented limits drives this much through
// a resistance (1 MV across 1e-12 ohm is 1e18 A), so a junction that
// reaches the tangent is one forced by a voltage with nothing to limit its
// current, and OnTangent reports it.
const MaxLawCurrent = 1e30

// logMaxLawCurrent is ln MaxLawCurrent.
var logMaxLawCurrent = math.Log(MaxLawCurrent)

// Device is a diode model at one temperature: the parameters of Params
// scaled to TempK, ready for evaluation.
type Device struct {
	Params Params  // as given, valid at Params.MeasuredAtK
	TempK  float64 // temperature the laws below hold at

	ThermalVoltage    float64 // V_T = kT/q
	SaturationCurrent float64 // I_S(T); zero where it underflows, see LogSaturationCurrent
	// LogSaturationCurrent is ln I_S(T), which the laws use: far below
	// T0 the saturation current itself underflows (a silicon junction at
	// 10 K has I_S near e^-1287 A) while the currents it implies do not.
	LogSaturationCurrent float64
	BuiltInPotential     float64 // V_bi(T)
	ZeroBiasCapacitance  float64 // C_j0(T)

	nvt float64 // n V_T

	// Notes lists anything the temperature scaling had to clamp.
	Notes []string
}

// New returns the device of model p at temperature tempK.
//
// The saturation current follows
//
//	I_S(T) = I_S(T0) (T/T0)^(p/n) exp((q E_g / (n k)) (1/T0 - 1/T))
//
// (Gray, Hurst, Lewis, Meyer, 5th ed., 2009, ch. 1). The built-in potential
// follows from V_bi = (kT/q) ln(N_A N_D / n_i²) with n_i² ∝ T³ exp(-E_g/kT)
// (Sze and Ng, 3rd ed., 2007, ch. 1-2), holding E_g constant:
//
//	V_bi(T) = E_g + (T/T0) (V_bi(T0) - E_g) - 3 V_T ln(T/T0)
//
// and the zero-bias capacitance scales as C_j0 ∝ V_bi^(-m), the depletion
// width law. Breakdown voltage, series resistance and transit time are held
// constant.
func New(p Params, tempK float64) *Device {
	d := &Device{Params: p, TempK: tempK}
	d.ThermalVoltage = ThermalVoltage(tempK)
	d.nvt = p.Ideality * d.ThermalVoltage

	t0 := p.MeasuredAtK
	ratio := tempK / t0
	vt0 := Boltzmann / Charge // volts per kelvin
	// In logarithmic form, so that neither factor can underflow or
	// overflow on its own.
	d.LogSaturationCurrent = math.Log(p.SaturationCurrent) + p.SaturationExponent/p.Ideality*math.Log(ratio) +
		p.GapEnergy/(p.Ideality*vt0)*(1/t0-1/tempK)
	d.SaturationCurrent = math.Exp(d.LogSaturationCurrent)

	builtIn := p.GapEnergy + ratio*(p.BuiltInPotential-p.GapEnergy) - 3*d.ThermalVoltage*math.Log(ratio)
	// The law is for a junction between two doped regions; far from T0 or
	// with an unusual E_g it can leave the physical range. Keep V_bi
	// positive and say so.
	floor := 0.1 * p.BuiltInPotential
	if builtIn < floor {
		d.Notes = append(d.Notes, fmt.Sprintf("built-in potential at %.2f K computes to %.3g V; held at %.3g V", tempK, builtIn, floor))
		builtIn = floor
	}
	d.BuiltInPotential = builtIn
	d.ZeroBiasCapacitance = p.ZeroBiasCapacitance * math.Pow(p.BuiltInPotential/builtIn, p.Grading)
	return d
}

// NVT returns n V_T, the junction's exponential voltage scale.
func (d *Device) NVT() float64 { return d.nvt }

// boundedExp returns c(a) = exp(logScale + a) and its first three
// derivatives with respect to a, continuing along the tangent beyond the
// argument where c reaches MaxLawCurrent.
func boundedExp(logScale, a float64) (e, e1, e2, e3 float64) {
	if top := logMaxLawCurrent - logScale; a > top {
		return MaxLawCurrent * (1 + a - top), MaxLawCurrent, 0, 0
	}
	e = math.Exp(logScale + a)
	return e, e, e, e
}

// OnTangent reports whether the junction voltage v lies beyond the point
// where the forward law or the breakdown knee implies MaxLawCurrent, where
// the laws continue along their tangents and no longer describe a
// junction.
func (d *Device) OnTangent(v float64) bool {
	if v/d.nvt > logMaxLawCurrent-d.LogSaturationCurrent {
		return true
	}
	kneeVoltage := d.Params.BreakdownVoltage
	return kneeVoltage > 0 && -(v+kneeVoltage)/d.nvt > logMaxLawCurrent-math.Log(d.Params.BreakdownCurrent)
}

// ForwardCurrent returns the ideal junction current
//
//	i_f(v) = I_S (exp(v / (n V_T)) - 1)
//
// without the breakdown knee, evaluated as exp(ln I_S + v/(n V_T)) - I_S so
// that an I_S(T) too small for a float64 still gives the current it
// implies.
func (d *Device) ForwardCurrent(v float64) Law {
	a := v / d.nvt
	e, e1, e2, e3 := boundedExp(d.LogSaturationCurrent, a)
	value := e - d.SaturationCurrent
	if math.Abs(a) < 1 {
		value = d.SaturationCurrent * math.Expm1(a) // no cancellation near zero bias
	}
	return Law{
		Value: value,
		D1:    e1 / d.nvt,
		D2:    e2 / (d.nvt * d.nvt),
		D3:    e3 / (d.nvt * d.nvt * d.nvt),
	}
}

// BreakdownCurrent returns the reverse knee current
//
//	i_b(v) = -I_BV (exp(-(v + V_BV) / (n V_T)) - exp(-V_BV / (n V_T)))
//
// which equals -I_BV (to within I_BV e^(-V_BV/nV_T)) at v = -V_BV and is
// exactly zero at v = 0. It is zero for a model without a knee.
func (d *Device) BreakdownCurrent(v float64) Law {
	kneeVoltage := d.Params.BreakdownVoltage
	if kneeVoltage <= 0 {
		return Law{}
	}
	kneeCurrent := d.Params.BreakdownCurrent
	logKnee := math.Log(kneeCurrent)
	e, e1, e2, e3 := boundedExp(logKnee, -(v+kneeVoltage)/d.nvt)
	e0, _, _, _ := boundedExp(logKnee, -kneeVoltage/d.nvt)
	value := -(e - e0)
	if a := v / d.nvt; math.Abs(a) < 1 {
		value = -e0 * math.Expm1(-a) // exactly zero at zero bias
	}
	k := d.nvt
	return Law{
		Value: value,
		D1:    e1 / k,
		D2:    -e2 / (k * k),
		D3:    e3 / (k * k * k),
	}
}

// Current returns the junction current i(v) = i_f(v) + i_b(v), positive from
// anode to cathode through the junction.
func (d *Device) Current(v float64) Law {
	return d.ForwardCurrent(v).Add(d.BreakdownCurrent(v))
}

// DepletionCharge returns the depletion charge q_j(v) with q_j(0) = 0.
// Up to v = V_bi/2 it is the textbook law (Sze and Ng, ch. 2)
//
//	q_j(v) = C_j0 V_bi / (1 - m) [1 - (1 - v/V_bi)^(1-m)],  dq_j/dv = C_j0 / (1 - v/V_bi)^m
//
// and above V_bi/2 the capacitance continues as the quadratic with the same
// value, slope and curvature at V_bi/2, so that q_j and its first three
// derivatives are continuous everywhere.
func (d *Device) DepletionCharge(v float64) Law {
	zeroBias := d.ZeroBiasCapacitance
	if zeroBias == 0 {
		return Law{}
	}
	vb, m := d.BuiltInPotential, d.Params.Grading
	v1 := depletionKnee * vb
	if v <= v1 {
		return textbookDepletion(v, zeroBias, vb, m)
	}
	k := textbookDepletion(v1, zeroBias, vb, m)
	dv := v - v1
	return Law{
		Value: k.Value + k.D1*dv + k.D2*dv*dv/2 + k.D3*dv*dv*dv/6,
		D1:    k.D1 + k.D2*dv + k.D3*dv*dv/2,
		D2:    k.D2 + k.D3*dv,
		D3:    k.D3,
	}
}

func textbookDepletion(v, cj0, vb, m float64) Law {
	u := 1 - v/vb
	um := math.Pow(u, -m) // (1 - v/V_bi)^-m
	return Law{
		Value: cj0 * vb / (1 - m) * (1 - u*um),
		D1:    cj0 * um,
		D2:    cj0 * m / vb * um / u,
		D3:    cj0 * m * (m + 1) / (vb * vb) * um / (u * u),
	}
}

// DiffusionCharge returns the stored minority-carrier charge
// q_d(v) = tau_T i_f(v), whose derivative is the diffusion capacitance
// tau_T g_d (Sze and Ng, ch. 2). The breakdown current stores none.
func (d *Device) DiffusionCharge(v float64) Law {
	tau := d.Params.TransitTime
	if tau == 0 {
		return Law{}
	}
	return d.ForwardCurrent(v).Scale(tau)
}

// Charge returns the total junction charge q_j(v) + q_d(v).
func (d *Device) Charge(v float64) Law {
	return d.DepletionCharge(v).Add(d.DiffusionCharge(v))
}

// CriticalVoltage returns the junction voltage above which a Newton step is
// limited: n V_T ln(n V_T / (√2 I_S)), where the exponential's curvature
// makes a full linear step unsafe (Vlach and Singhal, 2nd ed., 1994).
func (d *Device) CriticalVoltage() float64 {
	return d.nvt * (math.Log(d.nvt/math.Sqrt2) - d.LogSaturationCurrent)
}

// Limit returns the junction voltage a Newton iteration should use next when
// the linear solve proposes vNew after vOld: above the critical voltage a
// forward step is replaced by the logarithmic step that keeps the
// exponential's growth linear in the iteration count, and the same rule,
// mirrored about -V_BV, applies into breakdown (junction-voltage limiting,
// Vlach and Singhal, "Computer Methods for Circuit Analysis and Design",
// 2nd ed., 1994). It reports whether vNew was changed.
func (d *Device) Limit(vNew, vOld float64) (float64, bool) {
	v, limited := limitExp(vNew, vOld, d.nvt, d.CriticalVoltage())
	if limited {
		return v, true
	}
	kneeVoltage := d.Params.BreakdownVoltage
	if kneeVoltage > 0 && vNew < -kneeVoltage+d.nvt {
		vc := d.nvt * math.Log(d.nvt/(math.Sqrt2*d.Params.BreakdownCurrent))
		// In the mirrored variable u = -(v + V_BV) the knee behaves like a
		// forward junction with saturation current I_BV.
		u, lim := limitExp(-(vNew + kneeVoltage), -(vOld + kneeVoltage), d.nvt, vc)
		if lim {
			return -(u + kneeVoltage), true
		}
	}
	return vNew, false
}

// limitExp is the logarithmic step limit for an exponential with voltage
// scale s and critical voltage vc.
func limitExp(vNew, vOld, s, vc float64) (float64, bool) {
	if vNew <= vc || vNew <= 0 || math.Abs(vNew-vOld) <= 2*s {
		return vNew, false
	}
	if vOld > 0 {
		arg := 1 + (vNew-vOld)/s
		if arg > 0 {
			return vOld + s*math.Log(arg), true
		}
		return vc, true
	}
	return s * math.Log(vNew/s), true
}
