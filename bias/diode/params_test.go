package diode

import (
	"math"
	"testing"
)

// TestNoiseLaws checks the junction's noise densities against their
// closed forms: 2q(I_D + 2 I_S) shot noise (Schottky 1918), equal at zero
// bias to n·4kT g_d (Sze and Ng, ch. 2, for n = 1), and K |I|^a / f
// flicker noise.
func TestNoiseLaws(t *testing.T) {
	p := Defaults()
	p.SaturationCurrent = 1e-12
	d := New(p, 300.15)
	for _, v := range []float64{-0.3, 0, 0.2, 0.6} {
		want := 2 * Charge * (d.ForwardCurrent(v).Value + 2*d.SaturationCurrent)
		if got := d.ShotNoise(v); math.Abs(got-want) > 1e-15*want {
			t.Errorf("shot noise at %g V: %g A²/Hz, want 2q(I_D + 2 I_S) = %g", v, got, want)
		}
	}
	if got, want := d.ShotNoise(0), 4*Boltzmann*300.15*d.Current(0).D1; math.Abs(got-want) > 1e-12*want {
		t.Errorf("zero bias: shot %g A²/Hz, 4kT g_d %g (n = 1)", got, want)
	}
	if d.FlickerNoise(0.6, 10) != 0 {
		t.Error("flicker noise without a coefficient")
	}
	p.FlickerCoefficient = 1e-14
	d = New(p, 300.15)
	i := d.Current(0.6).Value
	if got, want := d.FlickerNoise(0.6, 10), 1e-14*i/10; math.Abs(got-want) > 1e-12*want {
		t.Errorf("flicker with the exponent unset: %g, want K I/f = %g", got, want)
	}
	p.FlickerExponent = 2
	d = New(p, 300.15)
	if got, want := d.FlickerNoise(0.6, 10), 1e-14*i*i/10; math.Abs(got-want) > 1e-12*want {
		t.Errorf("flicker with a = 2: %g, want K I²/f = %g", got, want)
	}
	// The reverse knee's current is counted as shot noise.
	p.BreakdownVoltage, p.BreakdownCurrent = 5, 1e-3
	d = New(p, 300.15)
	if got, want := d.ShotNoise(-5), 2*Charge*(d.ForwardCurrent(-5).Value+2*d.SaturationCurrent-d.BreakdownCurrent(-5).Value); math.Abs(got-want) > 1e-12*want {
		t.Errorf("in breakdown: %g A²/Hz, want %g", got, want)
	}
}
