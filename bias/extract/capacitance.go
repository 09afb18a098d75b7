package extract

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"

	"qpoint/bias/diode"
	"qpoint/bias/measured"
	"qpoint/bias/si"
)

// The entries of the C–V parameter vector in natural form.
const (
	cJ0 = iota // ln C_j0(T0)
	cBi        // V_bi(T0) in V
	cM         // m
	nCap
)

var capKeys = [nCap]string{"zero_bias_capacitance", "built_in_potential", "grading_coefficient"}

// Ranges of the C–V values: the circuit file's, with V_bi kept below 10 V
// and m off the ends of (0, 1) by a margin the optimiser cannot cross.
var (
	capLo = []float64{math.Log(1e-20), 0.01, 0.01}
	capHi = []float64{math.Log(1e-3), 10, 0.99}
)

// capacitanceAt is the junction capacitance dq/dv at the junction voltage
// of terminal voltage v.
func capacitanceAt(d *diode.Device, v float64) float64 {
	_, vj := d.TerminalCurrent(v)
	return d.Charge(vj).D1
}

// capProblem holds the C–V points and the model they refine.
type capProblem struct {
	v, c, temp []float64
	base       diode.Params
}

func (cp *capProblem) params(x []float64) diode.Params {
	p := cp.base
	p.ZeroBiasCapacitance = math.Exp(x[cJ0])
	p.BuiltInPotential = x[cBi]
	p.Grading = x[cM]
	return p
}

// residuals stores ln C(V_k; x) - ln C_k.
func (cp *capProblem) residuals(res, x []float64) {
	devices := deviceSet{params: cp.params(x)}
	for k := range cp.v {
		d := devices.at(cp.temp[k])
		res[k] = math.Log(capacitanceAt(d, cp.v[k])) - math.Log(cp.c[k])
	}
}

// fitCapacitance fits C_j0, V_bi and m to the C–V points, with the I–V
// values of model (for the junction voltage and the temperature law)
// held, and stores them in model.
func fitCapacitance(d Data, s Settings, model *diode.Params, r *Result) error {
	if len(d.Capacitance) < MinCapacitance {
		return &DataError{Set: measured.CapacitanceVoltage, Index: len(d.Capacitance) - 1, Msg: fmt.Sprintf(
			"%d C–V points; accepted: at least %d, spread over the reverse voltages of interest", len(d.Capacitance), MinCapacitance)}
	}
	cp := &capProblem{base: *model}
	for _, p := range d.Capacitance {
		cp.v = append(cp.v, p.Voltage)
		cp.c = append(cp.c, p.Value)
		cp.temp = append(cp.temp, s.tempOf(p))
	}
	x := capStart(cp, s.Defaults)
	free := []bool{true, true, true}
	defaults := []float64{x[cJ0], s.Defaults.BuiltInPotential, s.Defaults.Grading}
	res := make([]float64, len(cp.v))
	var cov *mat.SymDense
	var idx []int
	for {
		idx = idx[:0]
		for c, f := range free {
			if f {
				idx = append(idx, c)
			}
		}
		if err := minimizeCapacitance(cp, x, idx, r); err != nil {
			return err
		}
		// The covariance in ln C_j0, V_bi, m from a central-difference
		// Jacobian of the residuals.
		jac := mat.NewDense(len(cp.v), nCap, nil)
		fd.Jacobian(jac, cp.residuals, x, &fd.JacobianSettings{Formula: fd.Central, Step: 1e-6})
		cp.residuals(res, x)
		var ok bool
		cov, ok = covariance(jac, res, idx)
		hold, worst := -1, notDetermined
		for j, c := range idx {
			if c == cJ0 {
				continue
			}
			ratio := math.Inf(1)
			if ok {
				ratio = math.Sqrt(cov.At(j, j)) / math.Abs(x[c])
			}
			if capAtEdge(c, x[c]) {
				ratio = math.Inf(1)
			}
			if ratio > worst {
				hold, worst = c, ratio
			}
		}
		if hold < 0 {
			if !ok {
				return fmt.Errorf("C–V fit: the points do not determine the zero-bias capacitance; accepted: C–V points at several voltages")
			}
			break
		}
		what := "ends at the edge of its range"
		if ok && !math.IsInf(worst, 1) {
			j := indexOf(idx, hold)
			what = fmt.Sprintf("the fit gives %.3g ± %.2g", x[hold], math.Sqrt(cov.At(j, j)))
		}
		r.Cautions = append(r.Cautions, Caution{Kind: NotDetermined, Key: capKeys[hold], Index: -1, Message: fmt.Sprintf(
			"the C–V points do not determine %s (%s); held at its default %g and the other values fitted with it; points over a wider voltage range determine it",
			capKeys[hold], what, defaults[hold])})
		free[hold] = false
		x[hold] = defaults[hold]
		r.Stats.Refits++
	}
	for c := range nCap {
		r.found[capKeys[c]] = Value{Value: []float64{math.Exp(x[cJ0]), x[cBi], x[cM]}[c], Error: math.NaN(), Status: Default}
	}
	for j, c := range idx {
		se := math.Sqrt(cov.At(j, j))
		v := r.found[capKeys[c]]
		v.Status, v.Error = Fitted, se
		if c == cJ0 {
			v.Error = se * v.Value
		}
		r.found[capKeys[c]] = v
		for l := j + 1; l < len(idx); l++ {
			r.Correlations = append(r.Correlations, Correlation{A: capKeys[c], B: capKeys[idx[l]],
				Coefficient: cov.At(j, l) / math.Sqrt(cov.At(j, j)*cov.At(l, l))})
		}
	}
	fitted := cp.params(x)
	model.ZeroBiasCapacitance, model.BuiltInPotential, model.Grading = fitted.ZeroBiasCapacitance, fitted.BuiltInPotential, fitted.Grading
	beyond, at := 0, 0.0
	for k, p := range d.Capacitance {
		dv := diode.New(fitted, cp.temp[k])
		_, vj := dv.TerminalCurrent(p.Voltage)
		if vj > dv.BuiltInPotential/2 {
			beyond++
			at = math.Max(at, p.Voltage)
		}
		r.Capacitance = append(r.Capacitance, Residual{Index: k, Voltage: p.Voltage, Measured: p.Value,
			Model: p.Value * math.Exp(res[k]), TemperatureK: cp.temp[k], Residual: res[k]})
	}
	if beyond > 0 {
		r.Cautions = append(r.Cautions, Caution{Kind: OutsideLaw, Key: "built_in_potential", Set: measured.CapacitanceVoltage, Index: -1, Message: fmt.Sprintf(
			"%d C–V points (up to %s) lie forward of V_bi/2, where the model continues the depletion law smoothly rather than following it, and where a real junction adds diffusion capacitance; fit reverse-bias points alone for the depletion values",
			beyond, si.Format(at, "V", 3))})
	}
	systematic(r, r.Capacitance, "C–V", measured.CapacitanceVoltage)
	return nil
}

// minimizeCapacitance minimises Σ (ln C_model - ln C)² over the free
// entries idx of x with gonum/optimize's BFGS, in the unconstrained
// variables ln C_j0, ln V_bi and logit m (so every iterate lies in the
// law's range), with the gradient 2 Jᵀr from a central-difference
// Jacobian; x is updated in place.
func minimizeCapacitance(cp *capProblem, x []float64, idx []int, r *Result) error {
	toNatural := func(u []float64) []float64 {
		y := append([]float64(nil), x...)
		for j, c := range idx {
			switch c {
			case cJ0:
				y[c] = u[j]
			case cBi:
				y[c] = math.Exp(u[j])
			case cM:
				y[c] = 1 / (1 + math.Exp(-u[j]))
			}
			y[c] = math.Min(math.Max(y[c], capLo[c]), capHi[c])
		}
		return y
	}
	u0 := make([]float64, len(idx))
	for j, c := range idx {
		switch c {
		case cJ0:
			u0[j] = x[c]
		case cBi:
			u0[j] = math.Log(x[c])
		case cM:
			u0[j] = math.Log(x[c] / (1 - x[c]))
		}
	}
	res := make([]float64, len(cp.v))
	resU := func(y, u []float64) { cp.residuals(y, toNatural(u)) }
	jac := mat.NewDense(len(cp.v), len(idx), nil)
	problem := optimize.Problem{
		Func: func(u []float64) float64 {
			resU(res, u)
			s := sumSquares(res)
			if !finite(s) {
				return math.Inf(1)
			}
			return s
		},
		Grad: func(grad, u []float64) {
			fd.Jacobian(jac, resU, u, &fd.JacobianSettings{Formula: fd.Central, Step: 1e-7})
			resU(res, u)
			for j := range grad {
				g := 0.0
				for k := range res {
					g += 2 * jac.At(k, j) * res[k]
				}
				grad[j] = g
			}
		},
	}
	settings := &optimize.Settings{
		GradientThreshold: 1e-7,
		MajorIterations:   2000,
		Converger:         &optimize.FunctionConverge{Relative: 1e-14, Iterations: 20},
	}
	result, err := optimize.Minimize(problem, u0, settings, &optimize.BFGS{})
	if result == nil {
		return fmt.Errorf("C–V fit: %w", err)
	}
	r.Stats.CapacitanceEvaluations += result.FuncEvaluations
	r.Stats.CapacitanceStatus = result.Status.String()
	// A line search may end in failure at the optimum, where rounding
	// hides any further decrease. Whatever the status, the location is
	// accepted only where a Gauss–Newton step from it would move the
	// values by less than 1e-3 of their standard errors.
	fd.Jacobian(jac, resU, result.X, &fd.JacobianSettings{Formula: fd.Central, Step: 1e-7})
	resU(res, result.X)
	step, delta := gaussNewtonStep(jac, res)
	r.Stats.CapacitanceStep = step
	edge := false
	for _, c := range idx {
		edge = edge || capAtEdge(c, toNatural(result.X)[c])
	}
	// A value at the edge of its range is held by the caller; the step
	// from there says nothing.
	if !settled(step, delta, result.X, nil) && !edge {
		return fmt.Errorf("C–V fit: gonum/optimize ended with %v (%v) %.2g standard errors from the optimum", result.Status, err, step)
	}
	copy(x, toNatural(result.X))
	return nil
}

// capStart returns a start for the C–V fit: with m = 1/2, 1/C² is linear
// in V (1/C² = (1 - V/V_bi)/C_j0², the abrupt junction of Sze and Ng, ch.
// 2), so a straight line through 1/C² of the reverse points gives C_j0 and
// V_bi; where it does not (a slope of the wrong sign), C_j0 is the
// capacitance nearest zero bias and V_bi the default.
func capStart(cp *capProblem, def diode.Params) []float64 {
	var sx, sy, sxx, sxy, n float64
	near, nearV := cp.c[0], math.Inf(1)
	for k, v := range cp.v {
		if math.Abs(v) < nearV {
			near, nearV = cp.c[k], math.Abs(v)
		}
		if v > 0 {
			continue
		}
		y := 1 / (cp.c[k] * cp.c[k])
		sx, sy, sxx, sxy, n = sx+v, sy+y, sxx+v*v, sxy+v*y, n+1
	}
	cj0, vbi := near, def.BuiltInPotential
	if n >= 2 {
		slope := (n*sxy - sx*sy) / (n*sxx - sx*sx)
		icpt := (sy - slope*sx) / n
		if slope < 0 && icpt > 0 {
			cj0, vbi = 1/math.Sqrt(icpt), -icpt/slope
		}
	}
	vbi = math.Min(math.Max(vbi, 0.05), 5)
	return []float64{math.Log(cj0), vbi, 0.5}
}

func indexOf(s []int, v int) int {
	for i, x := range s {
		if x == v {
			return i
		}
	}
	return -1
}

// capAtEdge reports whether entry c of the C–V vector lies at the edge of
// its range (within 1e-4 of the range's span).
func capAtEdge(c int, v float64) bool {
	margin := 1e-4 * (capHi[c] - capLo[c])
	return v <= capLo[c]+margin || v >= capHi[c]-margin
}
