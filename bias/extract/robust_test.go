package extract

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"qpoint/bias/measured"
)

// TestArbitraryPoints: whatever valid points it is given, Fit returns a
// result whose values are finite and inside the circuit file's ranges, or
// an error; it never panics.
func TestArbitraryPoints(t *testing.T) {
	rng := rand.New(rand.NewPCG(99, 18))
	n := 150
	if testing.Short() {
		n = 30
	}
	fitted, refused, failed := 0, 0, 0
	defer func() { t.Logf("%d fitted, %d refused as data, %d failed", fitted, refused, failed) }()
	for trial := range n {
		var d Data
		count := 3 + rng.IntN(40)
		vs := make([]float64, count)
		for k := range vs {
			vs[k] = (rng.Float64()*2 - 0.5) * math.Pow(10, rng.Float64()*2-1)
		}
		slices.Sort(vs)
		vs = slices.Compact(vs)
		for _, v := range vs {
			i := math.Copysign(math.Pow(10, -12+rng.Float64()*11), v)
			if v == 0 {
				i = 0
			}
			d.Current = append(d.Current, measured.Point{Voltage: v, Value: i})
		}
		if rng.IntN(2) == 0 {
			for k := range 3 + rng.IntN(10) {
				d.Capacitance = append(d.Capacitance, measured.Point{Voltage: -3 + 0.3*float64(k), Value: math.Pow(10, -14+rng.Float64()*3)})
			}
		}
		r, err := Fit(d, Settings{})
		if err != nil {
			var de *DataError
			if errors.As(err, &de) {
				refused++
			} else {
				failed++
			}
			if err.Error() == "" {
				t.Errorf("trial %d: empty error", trial)
			}
			continue
		}
		fitted++
		m := r.Model
		for _, v := range []float64{m.SaturationCurrent, m.Ideality, m.SeriesResistance, m.ZeroBiasCapacitance, m.BuiltInPotential, m.Grading, m.BreakdownVoltage, m.GapEnergy, m.SaturationExponent} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("trial %d: model %+v not finite", trial, m)
			}
		}
		if !(m.SaturationCurrent > 0) || m.Ideality < 0.9 || m.Ideality > 10 || m.SeriesResistance < 0 || !(m.Grading > 0 && m.Grading < 1) || !(m.BuiltInPotential > 0) {
			t.Errorf("trial %d: model outside the circuit file's ranges: %+v", trial, m)
		}
		for _, v := range r.Values {
			if v.Status == Fitted && !(v.Error > 0) {
				t.Errorf("trial %d: %s fitted with error %g", trial, v.Key, v.Error)
			}
		}
	}
}
