package study

import (
	"errors"
	"fmt"
	"math"

	"qpoint/bias/circuit"
)

// Solution is the outcome of a target search or an optimisation.
type Solution struct {
	Value      float64    // of the varied quantity
	Measure    float64    // the measure there
	Bracket    [2]float64 // the varied values that enclose the answer
	Tolerance  float64    // on Value, absolute
	Iterations int        // refinement evaluations
	AtEdge     bool       // an optimum at the end of the range
	// OnMagnitude: the optimisation compared |measure| because its sign
	// is only a polarity (Measure.OnMagnitude); Measure keeps the sign.
	OnMagnitude bool
}

// ErrNoCrossing reports a target the measure does not reach in the range.
var ErrNoCrossing = errors.New("the measure does not reach the target anywhere in the range")

// evaluate solves the study at one value of the (single) varied quantity.
func evaluate(c *circuit.Circuit, s Settings, value float64) *Step {
	one := s
	one.Axis.Values = []float64{value}
	one.Second = nil
	var st Step
	runStep(c, one, 0, 0, nil, &st, new(workspace))
	return &st
}

// FindTarget returns the value of the varied quantity at which measure m
// equals target: the first sign change of m - target along the study's
// steps brackets it, and Brent's method refines it to tol, relative to the
// range.
func FindTarget(r *Result, m *Measure, target, tol float64) (*Solution, error) {
	if r.Settings.Second != nil {
		return nil, errors.New("targets need a study with one varied quantity")
	}
	freqs := r.Settings.FrequenciesHz
	xs := r.Settings.Axis.Values
	prev, prevX := math.NaN(), math.NaN()
	var errs []error
	for i := range xs {
		v, err := m.Of(&r.Steps[i], freqs, r.Probes)
		if err != nil {
			errs = append(errs, err)
			continue
		}
		d := v - target
		if d == 0 {
			return &Solution{Value: xs[i], Measure: v, Bracket: [2]float64{xs[i], xs[i]}}, nil
		}
		if !math.IsNaN(prev) && (prev < 0) != (d < 0) {
			f := func(x float64) float64 {
				st := evaluate(r.Circuit, r.Settings, x)
				v, err := m.Of(st, freqs, r.Probes)
				if err != nil {
					return math.NaN()
				}
				return v - target
			}
			span := math.Abs(xs[len(xs)-1] - xs[0])
			x, n, err := brent(f, prevX, xs[i], prev, d, tol*span)
			if err != nil {
				return nil, err
			}
			st := evaluate(r.Circuit, r.Settings, x)
			val, _ := m.Of(st, freqs, r.Probes)
			return &Solution{Value: x, Measure: val, Bracket: [2]float64{prevX, xs[i]}, Tolerance: tol * span, Iterations: n}, nil
		}
		prev, prevX = d, xs[i]
	}
	if len(errs) == len(xs) {
		return nil, errs[0]
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range xs {
		if v, err := m.Of(&r.Steps[i], freqs, r.Probes); err == nil {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	return nil, fmt.Errorf("%w: %s spans %.4g to %.4g %s between %g and %g, target %.4g", ErrNoCrossing, m.Text, lo, hi, m.Unit, xs[0], xs[len(xs)-1], target)
}

// brent finds a root of f in [a, b] with f(a) = fa, f(b) = fb of opposite
// signs, to absolute tolerance tol (Brent 1973, ch. 4: inverse quadratic
// interpolation, secant and bisection, with bisection guaranteed).
func brent(f func(float64) float64, a, b, fa, fb, tol float64) (float64, int, error) {
	c, fc := a, fa
	d := b - a
	e := d
	for it := 1; it <= 100; it++ {
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol1 := 2*2.2e-16*math.Abs(b) + tol/2
		xm := (c - b) / 2
		if math.Abs(xm) <= tol1 || fb == 0 {
			return b, it, nil
		}
		if math.Abs(e) >= tol1 && math.Abs(fa) > math.Abs(fb) {
			s := fb / fa
			var p, q float64
			if a == c {
				p = 2 * xm * s
				q = 1 - s
			} else {
				q = fa / fc
				r := fb / fc
				p = s * (2*xm*q*(q-r) - (b-a)*(r-1))
				q = (q - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			if 2*p < math.Min(3*xm*q-math.Abs(tol1*q), math.Abs(e*q)) {
				e = d
				d = p / q
			} else {
				d = xm
				e = d
			}
		} else {
			d = xm
			e = d
		}
		a, fa = b, fb
		if math.Abs(d) > tol1 {
			b += d
		} else {
			b += math.Copysign(tol1, xm)
		}
		fb = f(b)
		if math.IsNaN(fb) {
			return 0, it, fmt.Errorf("the circuit could not be solved at %g during the search", b)
		}
	}
	return b, 100, errors.New("the root search did not converge in 100 steps")
}

// Optimize returns the value of the varied quantity, within the range,
// that maximises (or minimises) measure m: the best step on the grid, then
// golden-section search between its neighbours to tol relative to the
// range (Brent 1973, ch. 5).
func Optimize(r *Result, m *Measure, maximize bool, tol float64) (*Solution, error) {
	if r.Settings.Second != nil {
		return nil, errors.New("optimisation needs a study with one varied quantity")
	}
	freqs := r.Settings.FrequenciesHz
	xs := r.Settings.Axis.Values
	sign := 1.0
	if !maximize {
		sign = -1
	}
	best, bi := math.Inf(-1), -1
	var firstErr error
	for i := range xs {
		v, err := m.Of(&r.Steps[i], freqs, r.Probes)
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			continue
		}
		if o := sign * m.objective(v); o > best {
			best, bi = o, i
		}
	}
	if bi < 0 {
		return nil, firstErr
	}
	lo, hi := xs[max(bi-1, 0)], xs[min(bi+1, len(xs)-1)]
	f := func(x float64) float64 {
		st := evaluate(r.Circuit, r.Settings, x)
		v, err := m.Of(st, freqs, r.Probes)
		if err != nil {
			return math.Inf(-1)
		}
		return sign * m.objective(v)
	}
	span := math.Abs(xs[len(xs)-1] - xs[0])
	const g = 0.6180339887498949 // (√5 - 1)/2
	a, b := math.Min(lo, hi), math.Max(lo, hi)
	x1, x2 := b-g*(b-a), a+g*(b-a)
	f1, f2 := f(x1), f(x2)
	n := 2
	for math.Abs(b-a) > tol*span && n < 200 {
		if f1 > f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - g*(b-a)
			f1 = f(x1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + g*(b-a)
			f2 = f(x2)
		}
		n++
	}
	x, v := x1, f1
	if f2 > f1 {
		x, v = x2, f2
	}
	if best > v {
		x = xs[bi]
	}
	// Report the measure's own (signed) value at the optimum.
	val, err := m.Of(evaluate(r.Circuit, r.Settings, x), freqs, r.Probes)
	if err != nil {
		return nil, err
	}
	return &Solution{Value: x, Measure: val, Bracket: [2]float64{lo, hi}, Tolerance: tol * span, Iterations: n,
		AtEdge: bi == 0 || bi == len(xs)-1, OnMagnitude: m.OnMagnitude()}, nil
}
