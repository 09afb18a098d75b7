package extract

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"

	"qpoint/bias/diode"
	"qpoint/bias/measured"
	"qpoint/bias/si"
)

// The entries of the forward parameter vector.
const (
	xIS  = iota // ln I_S(T0)
	xN          // n
	xR          // R_S in ohms
	xGap        // E_g in eV
	xExp        // p
	nForward
)

var forwardKeys = [nForward]string{"saturation_current", "ideality", "series_resistance", "gap_energy", "saturation_temperature_exponent"}

// vt0 is k/q in volts per kelvin.
const vt0 = diode.Boltzmann / diode.Charge

// notDetermined is the largest standard error, as a fraction of the
// value, of a value taken as determined by the data: beyond it the value
// is less than two standard errors from zero.
const notDetermined = 0.5

// forwardFit is the outcome of the forward fit.
type forwardFit struct {
	model  diode.Params // I_S, n, R_S, E_g, p at T0; no knee
	status [nForward]Status
	errs   [nForward]float64
	t0     float64
	used   []int // indices into Data.Current
	vt     float64
}

// forwardProblem holds the forward points: voltage, current, weight and
// temperature of each.
type forwardProblem struct {
	v, i, w, temp []float64
	t0            float64
	base          diode.Params
}

func (fp *forwardProblem) params(x []float64) diode.Params {
	p := fp.base
	p.SaturationCurrent = math.Exp(x[xIS])
	p.Ideality = x[xN]
	p.SeriesResistance = x[xR]
	p.GapEnergy = x[xGap]
	p.SaturationExponent = x[xExp]
	p.MeasuredAtK = fp.t0
	p.BreakdownVoltage, p.BreakdownCurrent = 0, 0
	return p
}

// eval stores the weighted residuals w_k (ln I(V_k) - ln I_k) and their
// derivatives. With g = di_j/dv at the junction voltage v_j and
// D = 1 + R_S g, implicit differentiation of i = i_j(V - i R_S) gives
//
//	∂ln I/∂ln I_S(T0) = 1/D,   ∂ln I/∂R_S = -g/D,
//	∂ln I/∂n  = (∂ln I_S(T)/∂n - g v_j/(n I)) / D,
//	∂ln I/∂E_g = (1/T0 - 1/T)/(n k/q) / D,   ∂ln I/∂p = ln(T/T0)/n / D,
//
// since i_j = I_S(T)(exp(v_j/(n V_T)) - 1) and ln I_S(T) - ln I_S(T0) =
// (p ln(T/T0) + E_g (1/T0 - 1/T)/(k/q))/n.
func (fp *forwardProblem) eval(x, r []float64, jac *mat.Dense) {
	p := fp.params(x)
	devices := deviceSet{params: p}
	for k := range fp.v {
		t := fp.temp[k]
		d := devices.at(t)
		cur, vj := d.TerminalCurrent(fp.v[k])
		cur = math.Max(cur, math.SmallestNonzeroFloat64)
		r[k] = fp.w[k] * (math.Log(cur) - math.Log(fp.i[k]))
		if jac == nil {
			continue
		}
		g := d.Current(vj).D1
		n := p.Ideality
		w := fp.w[k] / (1 + p.SeriesResistance*g)
		jac.Set(k, xIS, w)
		jac.Set(k, xN, w*(-(math.Log(d.SaturationCurrent)-x[xIS])/n-g*vj/(n*cur)))
		jac.Set(k, xR, -w*g)
		jac.Set(k, xGap, w*(1/fp.t0-1/t)/(n*vt0))
		jac.Set(k, xExp, w*math.Log(t/fp.t0)/n)
	}
}

// Bounds of the forward values: the ranges the circuit file accepts.
var (
	forwardLo    = []float64{math.Log(1e-60), 0.9, 0, 0.1 + 1e-9, -20}
	forwardHi    = []float64{math.Log(1e3), 10, 1e6, 10, 20}
	forwardScale = []float64{1, 1, 1e-3, 1, 1}
)

func fitForward(d Data, s Settings, r *Result) (*forwardFit, error) {
	fp := &forwardProblem{base: s.Defaults}
	var used []int
	for k, p := range d.Current {
		if p.Voltage <= 0 {
			continue
		}
		if p.Value == 0 {
			r.Cautions = append(r.Cautions, Caution{Kind: PointLeftOut, Set: measured.CurrentVoltage, Index: k,
				Message: at(p) + fmt.Sprintf("zero current at %.6g V cannot be placed on a logarithmic scale; the point is left out", p.Voltage)})
			continue
		}
		used = append(used, k)
		fp.v = append(fp.v, p.Voltage)
		fp.i = append(fp.i, p.Value)
		fp.temp = append(fp.temp, s.tempOf(p))
		fp.w = append(fp.w, 1/math.Hypot(1, s.CurrentFloor/p.Value))
	}
	if len(used) < MinForward {
		idx := len(d.Current) - 1
		if len(used) > 0 {
			idx = used[len(used)-1]
		}
		return nil, &DataError{Set: measured.CurrentVoltage, Index: idx, Msg: fmt.Sprintf(
			"%d forward points (positive voltage and current); accepted: at least %d, from the lowest current the meter resolves up into the range where the series resistance shows", len(used), MinForward)}
	}
	temps := slices.Clone(fp.temp)
	slices.Sort(temps)
	temps = slices.Compact(temps)
	r.Temperatures = temps
	t0 := s.MeasuredAtK
	if !(t0 > 0) {
		t0 = temps[0]
		for _, t := range temps {
			if math.Abs(t-300.15) < math.Abs(t0-300.15) {
				t0 = t
			}
		}
	}
	fp.t0 = t0
	f := &forwardFit{t0: t0, used: used, vt: diode.ThermalVoltage(t0)}

	x := forwardStart(fp, temps, s.Defaults)
	free := []bool{true, true, true, len(temps) >= 2, len(temps) >= 3}
	defaults := []float64{x[xIS], x[xN], s.Defaults.SeriesResistance, s.Defaults.GapEnergy, s.Defaults.SaturationExponent}
	prob := &lsq{residuals: len(fp.v), eval: fp.eval, free: free, lo: forwardLo, hi: forwardHi, scale: forwardScale}
	res := make([]float64, len(fp.v))
	jac := mat.NewDense(len(fp.v), nForward, nil)
	var cov *mat.SymDense
	var idx []int
	for {
		st, err := prob.marquardt(x, s.MaxIterations)
		r.Stats.Iterations += st.iterations
		r.Stats.Evaluations += st.evaluations
		if err != nil {
			return nil, fmt.Errorf("forward I–V fit: %w", err)
		}
		fp.eval(x, res, jac)
		idx = prob.freeIndex()
		sub := mat.NewDense(len(res), len(idx), nil)
		for j, c := range idx {
			sub.Slice(0, len(res), j, j+1).(*mat.Dense).Copy(jac.Slice(0, len(res), c, c+1))
		}
		step, delta := gaussNewtonStep(sub, res)
		r.Stats.ForwardStep = step
		xs, scales := make([]float64, len(idx)), make([]float64, len(idx))
		for j, c := range idx {
			xs[j], scales[j] = x[c], forwardScale[c]
		}
		if !settled(step, delta, xs, scales) && !atEdge(x, idx) {
			return nil, fmt.Errorf("forward I–V fit: Levenberg–Marquardt stopped after %d iterations %.2g standard errors from the optimum; the points may not follow a junction's law (a straight line of a resistor or a short, columns swapped, or a second device in parallel)", st.iterations, r.Stats.ForwardStep)
		}
		var ok bool
		cov, ok = covariance(jac, res, idx)
		hold, before, se := undetermined(x, cov, ok, idx)
		if hold < 0 {
			if !ok {
				return nil, fmt.Errorf("forward I–V fit: the points do not determine saturation current and ideality together; accepted: forward points spread over at least two decades of current")
			}
			break
		}
		r.Cautions = append(r.Cautions, Caution{Kind: NotDetermined, Key: forwardKeys[hold], Index: -1,
			Message: heldMessage(hold, before, se, defaults[hold], fp, len(temps))})
		free[hold] = false
		x[hold] = defaults[hold]
		r.Stats.Refits++
	}
	for c := range nForward {
		f.status[c] = Default
		f.errs[c] = math.NaN()
	}
	for j, c := range idx {
		f.status[c] = Fitted
		f.errs[c] = math.Sqrt(cov.At(j, j))
		for l := j + 1; l < len(idx); l++ {
			rho := cov.At(j, l) / math.Sqrt(cov.At(j, j)*cov.At(l, l))
			a, b := forwardKeys[c], forwardKeys[idx[l]]
			r.Correlations = append(r.Correlations, Correlation{A: a, B: b, Coefficient: rho})
			if math.Abs(rho) > 0.999 {
				r.Cautions = append(r.Cautions, Caution{Kind: StrongCorrelation, Key: a, Index: -1, Message: fmt.Sprintf(
					"%s and %s are correlated at %.4f: each is uncertain alone while the pair describes the data; quote and change them together", a, b, rho)})
			}
		}
	}
	f.errs[xIS] *= math.Exp(x[xIS])
	f.model = fp.params(x)
	switch len(temps) {
	case 1:
		for _, c := range []int{xGap, xExp} {
			r.Cautions = append(r.Cautions, Caution{Kind: NotDetermined, Key: forwardKeys[c], Index: -1, Message: fmt.Sprintf(
				"the I–V points are at one temperature (%s): %s left at its default %s; points at two or more temperatures determine it",
				si.Format(temps[0], "K", 5), forwardKeys[c], fmtValue(c, defaults[c]))})
		}
	case 2:
		if f.status[xExp] == Default && f.status[xGap] == Fitted {
			r.Cautions = append(r.Cautions, Caution{Kind: NotDetermined, Key: forwardKeys[xExp], Index: -1, Message: fmt.Sprintf(
				"two temperatures determine one combination of gap_energy and the exponent: saturation_temperature_exponent held at its default %g and gap_energy fitted with it; a third temperature separates them", defaults[xExp])})
		}
	}
	if x[xN] <= forwardLo[xN] || x[xN] >= forwardHi[xN] {
		r.Cautions = append(r.Cautions, Caution{Kind: OutsideLaw, Key: "ideality", Index: -1, Message: fmt.Sprintf(
			"the ideality ends at %g, the edge of the range the circuit file accepts (0.9 to 10): the law does not describe these points", x[xN])})
	}
	for k, pi := range used {
		cur := math.Exp(res[k]/fp.w[k]) * fp.i[k]
		r.Forward = append(r.Forward, Residual{Index: pi, Voltage: fp.v[k], Measured: fp.i[k], Model: cur,
			TemperatureK: fp.temp[k], Residual: res[k] / fp.w[k]})
	}
	systematic(r, r.Forward, "forward I–V", measured.CurrentVoltage)
	return f, nil
}

// undetermined returns the free entry the data determine least, if any
// is not determined: one at the edge of its range, or whose standard
// error exceeds notDetermined of its size. ln I_S and n are never
// returned. With a singular JᵀJ the exponent, the gap energy and R_S are
// given up in that order. It also returns that entry's value and standard
// error (NaN when unknown).
func undetermined(x []float64, cov *mat.SymDense, ok bool, idx []int) (hold int, value, se float64) {
	hold, worst := -1, notDetermined
	if !ok {
		for _, c := range []int{xExp, xGap, xR} {
			if slices.Contains(idx, c) {
				return c, x[c], math.NaN()
			}
		}
		return -1, 0, 0
	}
	for j, c := range idx {
		if c == xIS || c == xN {
			continue
		}
		e := math.Sqrt(cov.At(j, j))
		ratio := e / math.Abs(x[c])
		if x[c] <= forwardLo[c] || x[c] >= forwardHi[c] {
			ratio = math.Inf(1)
		}
		if ratio > worst {
			hold, worst, value, se = c, ratio, x[c], e
		}
	}
	return hold, value, se
}

// heldMessage says why a forward value went back to its default.
func heldMessage(c int, value, se, def float64, fp *forwardProblem, temps int) string {
	fit := "the fit ends at the edge of its range"
	if !math.IsNaN(se) && value > forwardLo[c] && value < forwardHi[c] {
		fit = fmt.Sprintf("the fit gives %s ± %s", fmtValue(c, value), fmtValue(c, se))
	}
	switch c {
	case xR:
		top := slices.Max(fp.i)
		return fmt.Sprintf("the forward points do not determine series_resistance (%s): up to the highest current, %s, its drop does not show beside the junction's; left at its default %s. Points at higher currents determine it",
			fit, si.Format(top, "A", 3), fmtValue(c, def))
	default:
		return fmt.Sprintf("the points at %d temperatures do not determine %s (%s); held at its default %s and the other values fitted with it",
			temps, forwardKeys[c], fit, fmtValue(c, def))
	}
}

// fmtValue prints a forward value in its unit.
func fmtValue(c int, v float64) string {
	switch c {
	case xR:
		return si.Format(v, "Ω", 3)
	case xGap:
		return si.Format(v, "eV", 3)
	}
	return si.Format(v, "", 3)
}

// forwardStart returns the start of the forward fit: n and I_S from the
// low-current points at the reference temperature (T0 if measured, else
// the temperature with most points), R_S from its highest currents, and
// with several temperatures E_g (and p, with three or more) from each
// temperature's I_S at that n, by linear least squares on the law.
func forwardStart(fp *forwardProblem, temps []float64, def diode.Params) []float64 {
	groups := map[float64][]int{}
	for k, t := range fp.temp {
		groups[t] = append(groups[t], k)
	}
	ref := temps[0]
	for _, t := range temps {
		if n := len(groups[t]); n > len(groups[ref]) || (n == len(groups[ref]) && t == fp.t0) {
			ref = t
		}
	}
	if len(groups[fp.t0]) >= 3 {
		ref = fp.t0
	}
	pick := func(ks []int, from []float64) []float64 {
		out := make([]float64, len(ks))
		for j, k := range ks {
			out[j] = from[k]
		}
		return out
	}
	v, i := pick(groups[ref], fp.v), pick(groups[ref], fp.i)
	vt := diode.ThermalVoltage(ref)
	lnIS, n := lowCurrentStart(v, i, vt)
	n = math.Min(math.Max(n, forwardLo[xN]), forwardHi[xN])
	rs := resistanceStart(v, i, lnIS, n, vt)
	gap, exp := def.GapEnergy, def.SaturationExponent
	if len(temps) >= 2 {
		// y_T = n (ln I_S(T) - ln I_S(T_ref)) = p ln(T/T_ref) + E_g (1/T_ref - 1/T)/(k/q)
		var x1, x2, y []float64
		for _, t := range temps {
			if t == ref {
				continue
			}
			ks := groups[t]
			lnT := interceptAt(pick(ks, fp.v), pick(ks, fp.i), n, diode.ThermalVoltage(t))
			x1 = append(x1, math.Log(t/ref))
			x2 = append(x2, (1/ref-1/t)/vt0)
			y = append(y, n*(lnT-lnIS))
		}
		if len(temps) >= 3 {
			var a11, a12, a22, b1, b2 float64
			for k := range y {
				a11 += x1[k] * x1[k]
				a12 += x1[k] * x2[k]
				a22 += x2[k] * x2[k]
				b1 += x1[k] * y[k]
				b2 += x2[k] * y[k]
			}
			if det := a11*a22 - a12*a12; det > 1e-12*a11*a22 {
				exp = (a22*b1 - a12*b2) / det
				gap = (a11*b2 - a12*b1) / det
			}
		} else {
			num, den := 0.0, 0.0
			for k := range y {
				num += x2[k] * (y[k] - exp*x1[k])
				den += x2[k] * x2[k]
			}
			gap = num / den
		}
		if !(gap > forwardLo[xGap] && gap < forwardHi[xGap]) || !(exp > forwardLo[xExp] && exp < forwardHi[xExp]) {
			gap, exp = def.GapEnergy, def.SaturationExponent
		}
		lnIS += (exp*math.Log(fp.t0/ref) + gap*(1/ref-1/fp.t0)/vt0) / n
	}
	return []float64{lnIS, n, rs, gap, exp}
}

// interceptAt is ln I_S of the ideal law at ideality n through the lower
// half of the currents (the median, as in lowCurrentStart).
func interceptAt(v, i []float64, n, vt float64) float64 {
	low := lowerHalf(i, 1)
	dev := make([]float64, len(low))
	for j, k := range low {
		dev[j] = math.Log(i[k]) - lnExpm1(v[k]/(n*vt))
	}
	return median(dev)
}

// systematic adds a caution when the signs of the residuals of one
// temperature, in voltage order, form far fewer runs than independent
// errors would: the Wald–Wolfowitz runs test (Wald and Wolfowitz, "On a
// test whether two samples are from the same population", Ann. Math.
// Stat. 11(2), 1940), with its normal approximation, at z < -3.
func systematic(r *Result, rs []Residual, what string, set measured.Kind) {
	groups := map[float64][]Residual{}
	for _, x := range rs {
		groups[x.TemperatureK] = append(groups[x.TemperatureK], x)
	}
	temps := make([]float64, 0, len(groups))
	for t := range groups {
		temps = append(temps, t)
	}
	slices.Sort(temps)
	for _, t := range temps {
		g := slices.Clone(groups[t])
		if len(g) < 10 {
			continue
		}
		slices.SortFunc(g, func(a, b Residual) int { return cmpFloat(a.Voltage, b.Voltage) })
		pos, neg, runs := 0, 0, 0
		last := 0
		for _, x := range g {
			s := 1
			if x.Residual < 0 {
				s = -1
			}
			if s > 0 {
				pos++
			} else {
				neg++
			}
			if s != last {
				runs++
				last = s
			}
		}
		n := float64(pos + neg)
		if pos == 0 || neg == 0 {
			continue
		}
		mu := 2*float64(pos)*float64(neg)/n + 1
		sigma := math.Sqrt((mu - 1) * (mu - 2) / (n - 1))
		if z := (float64(runs) - mu) / sigma; z < -3 {
			r.Cautions = append(r.Cautions, Caution{Kind: Systematic, Set: set, Index: -1, Message: fmt.Sprintf(
				"the %s residuals at %s run in %d stretches of one sign where about %.0f are expected (z = %.1f): the law does not follow these points over their whole range; see the residual figure",
				what, si.Format(t, "K", 5), runs, mu, z)})
		}
	}
}

// atEdge reports whether a free forward value sits at the edge of its
// range, where the unconstrained optimum lies outside and a Gauss–Newton
// step from the edge is not small.
func atEdge(x []float64, idx []int) bool {
	for _, c := range idx {
		if x[c] <= forwardLo[c] || x[c] >= forwardHi[c] {
			return true
		}
	}
	return false
}

// deviceSet makes the devices of one set of model values at each
// temperature asked for, once.
type deviceSet struct {
	params  diode.Params
	devices map[float64]*diode.Device
}

func (ds *deviceSet) at(tempK float64) *diode.Device {
	d := ds.devices[tempK]
	if d == nil {
		if ds.devices == nil {
			ds.devices = map[float64]*diode.Device{}
		}
		d = diode.New(ds.params, tempK)
		ds.devices[tempK] = d
	}
	return d
}
