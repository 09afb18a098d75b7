package steady

import (
	"math"
	"math/cmplx"
	"testing"

	"qpoint/ac"
	"qpoint/ac/internal/fixture"
	"qpoint/bias/diode"
)

// TestThirdOrderFundamental: for a junction driven by an ideal voltage
// V0 + V cos(wt) the current at w is exactly 2 I_S e^(V0/nV_T) I_1(x),
// x = V/(n V_T) (Abramowitz and Stegun 9.6.34), whose series
// 2 I_1(x) = x (1 + x²/8 + x⁴/192 + ...) (A&S 9.6.10) makes the
// third-order estimate x (1 + x²/8). The estimate is set beside both the
// Bessel law and the shooting waveform; at x = 0.77 it must hold within
// 0.05 dB (the first-order fundamental alone is 0.6 dB off there).
func TestThirdOrderFundamental(t *testing.T) {
	nw := network(t, junctionFixtureTight)
	vt := diode.ThermalVoltage(300.15)
	i0 := 1e-14 * math.Exp(0.6/vt)
	for _, c := range []struct {
		x, tolDB float64
	}{
		// The tolerance is the next term of the series, x⁴/192, as dB,
		// with a margin: 0.1 -> 4.5e-6 dB, 0.77 -> 0.015 dB, 1 -> 0.027 dB.
		{0.1, 1e-4}, {0.3, 1e-3}, {0.77, 0.05}, {1.0, 0.05},
	} {
		d := ac.Drive{Input: 0, Output: ac.Output{Port: -1, Node: "s"}, FrequencyHz: 1e6, EMF: c.x * vt}
		est, err := ac.Volterra(nw, d)
		if err != nil {
			t.Fatal(err)
		}
		st, err := Solve(nw, d, Settings{Samples: 128, Harmonics: 3})
		if err != nil {
			t.Fatal(err)
		}
		// The output is the current through the 10 nΩ sense resistor.
		bessel := 2 * i0 * fixture.BesselI(1, c.x) * 1e-8
		wave := st.Output[1].Amplitude
		lin := 20 * math.Log10(cmplx.Abs(est.Linear)/wave)
		third := 20 * math.Log10(cmplx.Abs(est.Fundamental)/wave)
		t.Logf("x = %4.2f: first order %+.4f dB, third order %+.5f dB from the waveform; waveform/Bessel %.2g",
			c.x, lin, third, wave/bessel-1)
		if math.Abs(wave/bessel-1) > 1e-6 {
			t.Errorf("x = %g: the waveform's fundamental %.10g V is not the Bessel law's %.10g V", c.x, wave, bessel)
		}
		if math.Abs(third) > c.tolDB {
			t.Errorf("x = %g: the third-order fundamental is %.4f dB from the waveform, want within %g dB", c.x, third, c.tolDB)
		}
		// The series gives exactly 1 + x²/8 relative to the linear term.
		if got, want := cmplx.Abs(est.Fundamental/est.Linear), 1+c.x*c.x/8; math.Abs(got/want-1) > 1e-6 {
			t.Errorf("x = %g: Fundamental/Linear = %.9f, series 1 + x²/8 = %.9f", c.x, got, want)
		}
		// An exponential driven by a voltage expands, without phase.
		if g := est.GainChangeDB(); !(g > 0) {
			t.Errorf("x = %g: gain change %.4g dB, want an expansion", c.x, g)
		}
		if p := est.PhaseChangeDeg(); math.Abs(p) > 1e-6 {
			t.Errorf("x = %g: phase change %.3g°, want none for a memoryless drive", c.x, p)
		}
	}
}
