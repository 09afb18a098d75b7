package diode

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// TestChargeEnergy checks the closed form of W(v) = ∫_0^v u dq(u) against
// gonum's Gauss-Legendre quadrature (a general-purpose library) of
// u · dq/du over [0, v], split at the depletion knee and in pieces a
// fraction of nV_T wide so that the exponential is resolved.
func TestChargeEnergy(t *testing.T) {
	p := testParams()
	for _, tc := range []struct {
		name   string
		modify func(*Params)
	}{
		{"depletion and diffusion", func(*Params) {}},
		{"depletion only", func(p *Params) { p.TransitTime = 0 }},
		{"diffusion only", func(p *Params) { p.ZeroBiasCapacitance = 0 }},
		{"linearly graded", func(p *Params) { p.Grading = 1.0 / 3 }},
	} {
		q := p
		tc.modify(&q)
		d := New(q, 300.15)
		for _, v := range []float64{-3.9, -1, -0.2, -1e-3, 1e-3, 0.05, 0.125, 0.2, 0.3, 0.45, 0.6} {
			got := d.ChargeEnergy(v)
			// ∫_0^v, split at the knee where the capacitance law changes.
			knee := depletionKnee * d.BuiltInPotential
			bounds := []float64{0, v}
			if v > knee {
				bounds = []float64{0, knee, v}
			}
			pieces := int(math.Ceil(math.Abs(v)/(0.1*d.NVT()))) + 1
			want := 0.0
			for i := 1; i < len(bounds); i++ {
				lo, hi, sign := bounds[i-1], bounds[i], 1.0
				if hi < lo {
					lo, hi, sign = hi, lo, -1
				}
				want += sign * quad.Fixed(func(u float64) float64 { return u * d.Charge(u).D1 }, lo, hi, 16*pieces, nil, 0)
			}
			if math.Abs(got-want) > 1e-9*math.Abs(want)+1e-30 {
				t.Errorf("%s: W(%g V) = %.12g J, quadrature gives %.12g", tc.name, v, got, want)
			}
			if !(got >= 0) {
				t.Errorf("%s: W(%g V) = %g J; the work on a charge from zero bias is never negative", tc.name, v, got)
			}
		}
	}
}

// TestLaws: the combined evaluation equals Current and Charge exactly.
func TestLaws(t *testing.T) {
	for _, tau := range []float64{0, 1e-10} {
		p := testParams()
		p.TransitTime = tau
		d := New(p, 300.15)
		for _, v := range []float64{-4, -3.8, -1, 0, 0.1, 0.2, 0.4, 15} {
			i, q := d.Laws(v)
			if i != d.Current(v) || q != d.Charge(v) {
				t.Errorf("tau %g, v %g: Laws gives %+v, %+v; Current and Charge give %+v, %+v", tau, v, i, q, d.Current(v), d.Charge(v))
			}
		}
	}
}
