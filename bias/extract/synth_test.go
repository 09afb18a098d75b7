package extract

import (
	"math"
	"math/rand/v2"

	"qpoint/bias/diode"
	"qpoint/bias/measured"
)

// forwardPoints returns n forward points of model p at temperature tempK
// with currents spaced evenly in log from lo to hi: each voltage is the
// exact one for its current, V = n V_T ln(I/I_S + 1) + I R_S, and the
// current is then given relative noise of standard deviation noise.
func forwardPoints(p diode.Params, tempK, lo, hi float64, n int, noise float64, rng *rand.Rand) []measured.Point {
	d := diode.New(p, tempK)
	var pts []measured.Point
	for k := range n {
		i := lo * math.Pow(hi/lo, float64(k)/float64(n-1))
		v := d.NVT()*math.Log1p(i/d.SaturationCurrent) + i*p.SeriesResistance
		if rng != nil {
			i *= 1 + noise*rng.NormFloat64()
		}
		pts = append(pts, measured.Point{Voltage: v, Value: i, TemperatureK: tempK, Line: k + 2})
	}
	return pts
}

// capacitancePoints returns n C–V points of model p from v0 to v1 with
// relative noise.
func capacitancePoints(p diode.Params, tempK, v0, v1 float64, n int, noise float64, rng *rand.Rand) []measured.Point {
	d := diode.New(p, tempK)
	var pts []measured.Point
	for k := range n {
		v := v0 + (v1-v0)*float64(k)/float64(n-1)
		c := capacitanceAt(d, v)
		if rng != nil {
			c *= 1 + noise*rng.NormFloat64()
		}
		pts = append(pts, measured.Point{Voltage: v, Value: c, TemperatureK: tempK, Line: k + 2})
	}
	return pts
}
