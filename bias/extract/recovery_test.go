package extract

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"qpoint/bias/diode"
)

func TestRecoveryCounts(t *testing.T) {
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance = 5e-11, 1.08, 6
	p.ZeroBiasCapacitance, p.BuiltInPotential, p.Grading = 0.3e-12, 0.6, 0.45
	want := map[string]float64{"saturation_current": 5e-11, "ideality": 1.08, "series_resistance": 6,
		"zero_bias_capacitance": 0.3e-12, "built_in_potential": 0.6, "grading_coefficient": 0.45}
	within := map[string]int{}
	within1 := map[string]int{}
	zs, zz := map[string]float64{}, map[string]float64{}
	for seed := uint64(1); seed <= uint64(nSeeds); seed++ {
		rng := rand.New(rand.NewPCG(seed, 18))
		d := Data{Current: forwardPoints(p, 300.15, 1e-9, 1e-1, 41, 0.01, rng),
			Capacitance: capacitancePoints(p, 300.15, -5, 0.2, 27, 0.01, rng)}
		r, err := Fit(d, Settings{})
		if err != nil {
			t.Fatal(seed, err)
		}
		for k, w := range want {
			v := r.Value(k)
			if math.Abs(v.Value-w) <= 2*v.Error {
				within[k]++
			}
			if math.Abs(v.Value-w) <= v.Error {
				within1[k]++
			}
			z := (v.Value - w) / v.Error
			zs[k] += z
			zz[k] += z * z
		}
	}
	fmt.Println(within, within1)
	for k := range want {
		m := zs[k] / float64(nSeeds)
		fmt.Printf("%s mean z %.3f sd z %.3f\n", k, m, math.Sqrt(zz[k]/float64(nSeeds)-m*m))
	}
}

var nSeeds = 1000
