package extract

import (
	"math"
	"slices"
)

// lnExpm1 returns ln(e^x - 1) for x > 0 without overflow.
func lnExpm1(x float64) float64 {
	if x > 1 {
		return x + math.Log1p(-math.Exp(-x))
	}
	return math.Log(math.Expm1(x))
}

func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := slices.Clone(v)
	slices.Sort(s)
	m := len(s) / 2
	if len(s)%2 == 1 {
		return s[m]
	}
	return (s[m-1] + s[m]) / 2
}

// lowCurrentStart finds starting values of ln I_S and n from forward
// points (v[k] > 0, i[k] > 0) at thermal voltage vt. It takes the lower
// half of the currents (at least three points), where the series
// resistance drops least, and for each trial n sets
//
//	ln I_S(n) = median_k (ln i_k - ln(exp(v_k/(n vt)) - 1)),
//
// the ideal law's intercept, keeping the n whose sum of absolute
// deviations from the law is least: the low-current slope of ln I against
// V, made robust to outlying points and exact near zero bias, where the
// law's -1 bends the plain logarithm.
func lowCurrentStart(v, i []float64, vt float64) (lnIS, n float64) {
	low := lowerHalf(i, 3)
	dev := make([]float64, len(low))
	intercept := func(n float64) (float64, float64) {
		for j, k := range low {
			dev[j] = math.Log(i[k]) - lnExpm1(v[k]/(n*vt))
		}
		c := median(dev)
		cost := 0.0
		for _, d := range dev {
			cost += math.Abs(d - c)
		}
		return c, cost
	}
	// A coarse logarithmic grid over the plausible range, then golden
	// section around the best grid point.
	const lo, hi, steps = 0.5, 20.0, 160
	ratio := math.Pow(hi/lo, 1.0/steps)
	best, bestCost := lo, math.Inf(1)
	for s, n := 0, lo; s <= steps; s, n = s+1, n*ratio {
		if _, c := intercept(n); c < bestCost {
			best, bestCost = n, c
		}
	}
	a, b := best/ratio, best*ratio
	const phi = 0.6180339887498949
	for range 60 {
		c, d := b-phi*(b-a), a+phi*(b-a)
		_, fc := intercept(c)
		_, fd := intercept(d)
		if fc < fd {
			b = d
		} else {
			a = c
		}
	}
	n = (a + b) / 2
	lnIS, _ = intercept(n)
	return lnIS, n
}

// resistanceStart estimates R_S from the highest third of the currents:
// the median of the excess voltage over the ideal law, v - n vt ln(i/I_S +
// 1), per ampere, not below zero.
func resistanceStart(v, i []float64, lnIS, n, vt float64) float64 {
	order := make([]int, len(i))
	for k := range order {
		order[k] = k
	}
	slices.SortFunc(order, func(a, b int) int { return cmpFloat(i[b], i[a]) })
	high := order[:max(1, len(order)/3)]
	var r []float64
	is := math.Exp(lnIS)
	for _, k := range high {
		r = append(r, (v[k]-n*vt*math.Log1p(i[k]/is))/i[k])
	}
	return math.Max(0, median(r))
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// lowerHalf returns the indices of the lower half of the currents i, at
// least least of them (or all).
func lowerHalf(i []float64, least int) []int {
	order := make([]int, len(i))
	for k := range order {
		order[k] = k
	}
	slices.SortFunc(order, func(a, b int) int { return cmpFloat(i[a], i[b]) })
	return order[:min(len(order), max(least, (len(order)+1)/2))]
}
