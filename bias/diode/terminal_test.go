package diode

import (
	"fmt"
	"math"
	"testing"
)

func TestLambertW(t *testing.T) {
	// W(1) = Ω = 0.5671432904097838, the omega constant (Corless et al.,
	// "On the Lambert W function", 1996).
	if got := lambertW(0); math.Abs(got-0.5671432904097838) > 1e-15 {
		t.Errorf("W(1) = %.17g, want the omega constant 0.5671432904097838", got)
	}
	// W(e) = 1 and W(x e^x) = x, the defining identity (Corless et al.).
	if got := lambertW(1); math.Abs(got-1) > 1e-15 {
		t.Errorf("W(e) = %.17g, want 1", got)
	}
	for _, x := range []float64{1e-300, 1e-12, 1e-6, 0.3, 2, 50, 3000, 1e7} {
		if got := lambertW(math.Log(x) + x); math.Abs(got-x) > 1e-14*x {
			t.Errorf("W(%g e^%g) = %.17g, want %g", x, x, got, x)
		}
	}
}

// TestTerminalCurrentClosedForm: where the current is well above I_S the
// Newton steps leave the Banwell-Jayakumar closed form (Electronics Letters
// 36(4), 2000) unchanged to rounding, and the root satisfies
// i = i_j(v - i R_S) and v_j = v - i R_S.
func TestTerminalCurrentClosedForm(t *testing.T) {
	cases := []struct{ is, n, rs float64 }{
		{1e-14, 1, 1}, {3e-6, 1.05, 20}, {1e-9, 1.8, 1e3}, {1e-16, 1.2, 0.05},
	}
	for _, c := range cases {
		p := Defaults()
		p.SaturationCurrent, p.Ideality, p.SeriesResistance = c.is, c.n, c.rs
		d := New(p, 300.15)
		for _, v := range []float64{-2, -0.1, -1e-4, 0, 1e-4, 0.05, 0.3, 0.7, 1, 5, 100} {
			name := fmt.Sprintf("IS=%g n=%g RS=%g v=%g", c.is, c.n, c.rs, v)
			i, vj := d.TerminalCurrent(v)
			if math.Abs(vj-(v-i*c.rs)) > 1e-15*math.Max(1, math.Abs(v)) {
				t.Errorf("%s: junction voltage %.17g, v - i R_S = %.17g", name, vj, v-i*c.rs)
			}
			if law := d.Current(vj).Value; math.Abs(law-i) > 1e-13*math.Abs(i)+1e-30 {
				t.Errorf("%s: current %.17g, junction law at v_j gives %.17g", name, i, law)
			}
			if math.Abs(i) > 10*c.is {
				want := d.closedFormCurrent(v, c.rs)
				if rel := math.Abs(i-want) / math.Abs(want); rel > 1e-13 {
					t.Errorf("%s: current %.17g, closed form %.17g (relative %.2g)", name, i, want, rel)
				}
			}
		}
	}
}

// TestTerminalCurrentKnee: in breakdown the current is the root of the law
// with the knee, which has no closed form; at -V_BV - I_BV R_S the junction
// sits at the knee and carries -(I_BV + I_S) (the knee law's definition).
func TestTerminalCurrentKnee(t *testing.T) {
	p := Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance = 1e-8, 1.1, 15
	p.BreakdownVoltage, p.BreakdownCurrent = 4, 1e-3
	d := New(p, 300.15)
	want := d.Current(-4).Value
	i, vj := d.TerminalCurrent(-4 + want*15)
	if math.Abs(i-want) > 1e-12*math.Abs(want) || math.Abs(vj+4) > 1e-12 {
		t.Errorf("at the knee: current %.15g A at v_j %.15g V, want %.15g A at -4 V", i, vj, want)
	}
}
