package diode

import "math"

// TerminalCurrent returns the current i through the diode at terminal
// voltage v (anode minus cathode, the drop on the series resistance R_S
// included) and the junction voltage v_j = v - i R_S: the root of
//
//	i = i_j(v - i R_S),   i_j = Current (forward law and breakdown knee).
//
// For the forward law alone the root has the closed form of Banwell and
// Jayakumar ("Exact analytical solution for current flow through diode
// with series resistance", Electronics Letters 36(4), 2000)
//
//	i = (n V_T / R_S) W((I_S R_S / (n V_T)) exp((v + I_S R_S) / (n V_T))) - I_S
//
// with W the principal branch of the Lambert W function. TerminalCurrent
// evaluates it and then takes safeguarded Newton steps on v_j + R_S i_j(v_j)
// = v, which is increasing in v_j with its root between 0 and v: the steps
// remove the rounding of the difference (n V_T/R_S) W - I_S near zero bias,
// and find the root where the breakdown knee, which has no closed form,
// carries the current. The current is read from the junction law where the
// junction sets it (R_S g_d < 1) and as (v - v_j)/R_S where the resistance
// does, whichever is less sensitive to the last rounding of v_j.
func (d *Device) TerminalCurrent(v float64) (current, junction float64) {
	r := d.Params.SeriesResistance
	if r == 0 {
		return d.Current(v).Value, v
	}
	lo, hi := math.Min(0, v), math.Max(0, v)
	vj := v - r*d.closedFormCurrent(v, r)
	if !(vj >= lo && vj <= hi) {
		vj = (lo + hi) / 2
	}
	for range 200 {
		l := d.Current(vj)
		h := vj + r*l.Value - v
		switch {
		case h > 0:
			hi = vj
		case h < 0:
			lo = vj
		default:
			return d.settle(v, vj, r)
		}
		next := vj - h/(1+r*l.D1)
		if !(next > lo && next < hi) {
			next = lo + (hi-lo)/2
		}
		if math.Abs(next-vj) <= 1e-15*math.Max(math.Abs(vj), d.nvt) {
			vj = next
			break
		}
		vj = next
	}
	return d.settle(v, vj, r)
}

// settle returns the current at the converged junction voltage vj.
func (d *Device) settle(v, vj, r float64) (float64, float64) {
	l := d.Current(vj)
	if r*l.D1 > 1 {
		return (v - vj) / r, vj
	}
	return l.Value, vj
}

// closedFormCurrent is the Banwell-Jayakumar current of the forward law in
// series with r > 0 (see TerminalCurrent), with the argument of W kept as
// its logarithm so that it stays finite at any bias.
func (d *Device) closedFormCurrent(v, r float64) float64 {
	is, nvt := d.SaturationCurrent, d.nvt
	logZ := math.Log(is*r/nvt) + (v+is*r)/nvt
	return nvt/r*lambertW(logZ) - is
}

// lambertW returns the principal branch W(z) of the Lambert W function,
// the solution w > 0 of w e^w = z, for z = exp(logZ) > 0. It runs Halley's
// iteration on f(w) = w + ln w - ln z, which stays finite for the enormous
// arguments of a diode far in forward bias (Corless, Gonnet, Hare, Jeffrey
// and Knuth, "On the Lambert W function", Adv. Comput. Math. 5, 1996).
// Below ln z = -700 it returns z itself, to which W is equal there within
// a relative z.
func lambertW(logZ float64) float64 {
	if logZ < -700 {
		return math.Exp(logZ)
	}
	w := 1.0
	if logZ > 1 {
		w = logZ - math.Log(logZ)
	} else if logZ < -1 {
		w = math.Exp(logZ)
	}
	for range 100 {
		f := w + math.Log(w) - logZ
		d1 := 1 + 1/w
		d2 := -1 / (w * w)
		next := w - 2*f*d1/(2*d1*d1-f*d2)
		if next <= 0 {
			next = w / 2
		}
		if math.Abs(next-w) <= 1e-16*math.Abs(w) {
			return next
		}
		w = next
	}
	return w
}
