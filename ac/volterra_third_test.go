package ac

import (
	"math"
	"math/cmplx"
	"testing"

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
		d := Drive{Input: 0, Output: Output{Port: -1, Node: "s"}, FrequencyHz: 1e6, EMF: c.x * vt}
		est, err := Volterra(nw, d)
		if err != nil {
			t.Fatal(err)
		}
		st, err := SteadyState(nw, d, SteadySettings{Samples: 128, Harmonics: 3})
		if err != nil {
			t.Fatal(err)
		}
		// The output is the current through the 10 nΩ sense resistor.
		bessel := 2 * i0 * besselI(1, c.x) * 1e-8
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

// TestGainStepCubic: for a series Linear (1 + r E²) the 1 dB step solves
// |1 + r E²| = 10^(∓1/20) exactly; with r real and negative (a compressing
// cubic) E² = (1 - 10^(-1/20)) / |r|, which for a memoryless cubic lies
// 9.64 dB below the input intercept (common practice: P1dB ≈ IIP3 - 9.6 dB).
func TestGainStepCubic(t *testing.T) {
	const z0 = 50.0
	for _, r := range []complex128{-3, -0.01, complex(-2, 1), 5} {
		e := &Estimate{Drive: Drive{EMF: 0.01}, inputZ0: z0, Linear: 1}
		e.Fundamental = e.Linear * (1 + r*complex(1e-4, 0))
		p, compress := e.GainStepDBm(1)
		E := DBmToEMF(p, z0)
		g := 20 * math.Log10(cmplx.Abs(1+r*complex(E*E, 0)))
		wantSign := -1.0
		if real(r) > 0 {
			wantSign = 1
		}
		if math.Abs(g-wantSign) > 1e-9 || compress != (wantSign < 0) {
			t.Errorf("r = %v: step at %.3f dBm gives %.6f dB (compression %v), want %+.0f dB", r, p, g, compress, wantSign)
		}
		if imag(r) == 0 && real(r) < 0 {
			// Memoryless cubic y = a1 x + a3 x³, x = E cos wt: one tone
			// gives a1 E (1 + (3/4)(a3/a1) E²), so r = 3a3/(4a1); two
			// tones of E each give IM3 = (3/4)|a3| E³, equal to a1 E at
			// E² = 4|a1|/(3|a3|) = 1/|r|: the intercept. The ratio of the
			// two levels is 1/(1 - 10^(-1/20)), 9.64 dB.
			iip3 := EMFToDBm(math.Sqrt(1/-real(r)), z0)
			if d := iip3 - p; math.Abs(d-9.636) > 0.01 {
				t.Errorf("r = %v: IIP3 - P1dB = %.3f dB, want 9.64 dB", r, d)
			}
		}
	}
}

// TestVolterraSweepEqualsEach: the estimate sweep, on one solver shared by
// every product frequency (the reduction for the 24-section ladder), gives
// each frequency's estimate as a lone Volterra on the dense LU does, to
// 1e-9 (the equality the tests hold the engines to).
func TestVolterraSweepEqualsEach(t *testing.T) {
	nw := network(t, benchLadder(75))
	freqs, _ := LogGrid(10e6, 1e9, 20)
	for _, two := range []bool{false, true} {
		d := Drive{Input: 0, Output: Output{Port: 1}, EMF: DBmToEMF(-30, 50)}
		if two {
			d.SecondToneHz = 1e6 // offset from each first tone
		}
		var all []float64
		for _, f := range freqs {
			x := d
			x.FrequencyHz = f
			if two {
				x.SecondToneHz = f + 1e6
			}
			all = productFrequencies(all, x)
		}
		if _, ok := newSolver(nw, all, engineAuto).(*reduction); !ok {
			t.Fatalf("the sweep's %d product frequencies should run on the reduction", len(all))
		}
		i := 0
		err := VolterraSweep(nw, d, freqs, func(e *Estimate) error {
			one := d
			one.FrequencyHz = freqs[i]
			if two {
				one.SecondToneHz = freqs[i] + 1e6
			}
			lu, err := volterraOn(nw, one, engineLU)
			if err != nil {
				return err
			}
			for _, p := range []struct {
				name string
				a, b complex128
			}{{"fundamental", e.Fundamental, lu.Fundamental}, {"HD2", e.HD2, lu.HD2}, {"HD3", e.HD3, lu.HD3}, {"IM3", e.IM3, lu.IM3}} {
				if cmplx.Abs(p.a-p.b) > 1e-9*cmplx.Abs(p.b)+1e-30 {
					t.Errorf("%g Hz (two tones %v): %s %v in the sweep, %v alone", freqs[i], two, p.name, p.a, p.b)
				}
			}
			i++
			return nil
		})
		if err != nil || i != len(freqs) {
			t.Fatalf("%d of %d estimates: %v", i, len(freqs), err)
		}
	}
}
