package ac

import (
	"math"
	"math/cmplx"
	"testing"
)

// TestInputImpedancePassive: every demo is passive at its bias point, so
// the resistance looking into any port, the other ports terminated, is
// never negative beyond rounding, from 1 mHz to 1 THz (Pozar, "Microwave
// Engineering", 4th ed., 2012, sec. 4.1: a passive one-port has
// Re Z >= 0). The S-matrix form Z_0 (1 + S)/(1 - S) printed -50 Ω - j1.6 TΩ
// for the attenuator at 1 mHz, where S lies within rounding of 1; each
// engine (reduced and dense) is tried.
func TestInputImpedancePassive(t *testing.T) {
	grid, err := LogGrid(1e-3, 1e12, 20)
	if err != nil {
		t.Fatal(err)
	}
	names, networks := demoNetworks(t)
	for k, nw := range networks {
		for _, engine := range []engine{engineAuto, engineLU, engineReduced} {
			var points []Point
			if _, _, err := new(Workspace).sweep(nw, grid, Settings{}, func(pt Point) error {
				points = append(points, pt)
				return nil
			}, engine); err != nil {
				t.Fatalf("%s: %v", names[k], err)
			}
			bad := 0
			for _, pt := range points {
				for i, z := range pt.InputImpedance {
					if cmplx.IsInf(z) {
						continue
					}
					// Rounding of Z = V/I: a few ε of |Z|.
					if !(real(z) >= -1e-12*cmplx.Abs(z)) {
						if bad < 3 {
							t.Errorf("%s (engine %v) at %g Hz: Z_in%d = %.6g Ω, a negative resistance", names[k], engine, pt.FrequencyHz, i+1, z)
						}
						bad++
					}
					if math.IsNaN(real(z)) {
						t.Errorf("%s at %g Hz: Z_in%d is NaN", names[k], pt.FrequencyHz, i+1)
					}
				}
			}
			if bad > 0 {
				t.Errorf("%s (engine %v): %d of %d points with negative input resistance", names[k], engine, bad, len(points))
			}
		}
	}
}
