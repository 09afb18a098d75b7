package ac

import (
	"math"
	"math/cmplx"
	"testing"

	"qpoint/ac/internal/fixture"
)

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
	nw := network(t, fixture.Ladder(75))
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
