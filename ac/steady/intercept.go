package steady

import (
	"errors"
	"math"
)

// Intercept is the third-order intercept read from a two-tone level
// sweep of the steady state as a bench measures it: straight lines of
// slope 1 through the fundamental and of slope 3 through the 2 f1 - f2
// product, fitted where the measured slopes are those, extended until
// they cross.
type Intercept struct {
	IIP3DBm float64 // input level per tone at the crossing
	// OIP3DBm is the output level there, into the output port's
	// reference impedance; NaN for a bare node (then the crossing is in
	// dBV: OIP3DBV).
	OIP3DBm float64
	OIP3DBV float64 // output at the crossing in dB relative to 1 V peak
	// Slope is the measured slope of the product against input over the
	// levels used, dB/dB: 3 where the product is third order.
	Slope float64
	// FromDBm and ToDBm are the lowest and highest input levels used.
	FromDBm, ToDBm float64
	Levels         int
}

// ErrNoIntercept reports a sweep with no run of levels over which the
// 2 f1 - f2 product rises at 3 dB/dB.
var ErrNoIntercept = errors.New("no levels where the third-order product rises 3 dB/dB: extend the sweep to lower levels")

// slopeTol is how far a measured slope may stray from 3 dB/dB (and the
// fundamental's from 1) for a step to count as small-signal.
const slopeTol = 0.05

// MeasuredIntercept fits the intercept to a two-tone level sweep (each
// point's Steady with Products) in the manner of a bench measurement
// (common practice): it takes the first run of consecutive levels, from
// the lowest where both lie above the waveform's numerical floor, over
// which each step raises the 2 f1 - f2 product by 3 ± 0.05 dB/dB and the
// fundamental by 1 ± 0.05 dB/dB, fits the two lines of fixed slope to
// those levels by least squares, and returns their crossing. outputZ0 is
// the output port's reference impedance, zero for a bare node.
func MeasuredIntercept(points []LevelPoint, outputZ0 float64) (*Intercept, error) {
	type pt struct{ in, fund, im3 float64 }
	var pts []pt
	for _, p := range points {
		if p.Steady == nil {
			continue
		}
		f, ok1 := p.Steady.Product(1, 0)
		m, ok2 := p.Steady.Product(2, -1)
		if !ok1 || !ok2 || f.Amplitude <= p.Steady.NoiseFloor || m.Amplitude <= p.Steady.NoiseFloor {
			pts = append(pts, pt{p.LevelDBm, math.NaN(), math.NaN()})
			continue
		}
		pts = append(pts, pt{p.LevelDBm, 20 * math.Log10(f.Amplitude), 20 * math.Log10(m.Amplitude)})
	}
	// The first run of small-signal steps.
	bestFrom, bestTo := -1, -1
	for i := 0; i < len(pts); {
		j := i
		for j+1 < len(pts) {
			a, b := pts[j], pts[j+1]
			d := b.in - a.in
			if d <= 0 || math.IsNaN(a.im3+b.im3+a.fund+b.fund) ||
				math.Abs((b.im3-a.im3)/d-3) > slopeTol || math.Abs((b.fund-a.fund)/d-1) > slopeTol {
				break
			}
			j++
		}
		if j > i {
			bestFrom, bestTo = i, j
			break
		}
		i = j + 1
	}
	if bestFrom < 0 {
		return nil, ErrNoIntercept
	}
	use := pts[bestFrom : bestTo+1]
	// Lines out = in + a1 and im3 = 3 in + a3: least squares gives the
	// mean offsets.
	var a1, a3, sx, sy, sxx, sxy float64
	for _, p := range use {
		a1 += p.fund - p.in
		a3 += p.im3 - 3*p.in
		sx += p.in
		sy += p.im3
		sxx += p.in * p.in
		sxy += p.in * p.im3
	}
	n := float64(len(use))
	a1 /= n
	a3 /= n
	res := &Intercept{Levels: len(use), FromDBm: use[0].in, ToDBm: use[len(use)-1].in}
	res.Slope = (n*sxy - sx*sy) / (n*sxx - sx*sx)
	res.IIP3DBm = (a1 - a3) / 2
	res.OIP3DBV = res.IIP3DBm + a1
	res.OIP3DBm = math.NaN()
	if outputZ0 > 0 {
		// |V|²/(2 Z0) in milliwatts, |V| = 10^(dBV/20).
		res.OIP3DBm = res.OIP3DBV - 10*math.Log10(2*outputZ0) + 30
	}
	return res, nil
}
