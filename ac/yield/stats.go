package yield

import (
	"math"
	"slices"
)

// z95 is the standard normal quantile Φ⁻¹(0.975) = 1.959963985 of a
// two-sided 95 % interval (Abramowitz and Stegun, Table 26.5).
const z95 = 1.959963984540054

// Wilson returns the Wilson score interval for a proportion after k
// successes in n trials at standard normal quantile z (1.96 for 95 %):
// the p for which |k/n - p| ≤ z √(p(1-p)/n),
//
//	(p̂ + z²/2n ± z √(p̂(1-p̂)/n + z²/4n²)) / (1 + z²/n),  p̂ = k/n
//
// (E. B. Wilson, "Probable inference, the law of succession, and
// statistical inference", JASA 22, 1927; R. G. Newcombe, "Two-sided
// confidence intervals for the single proportion: comparison of seven
// methods", Statistics in Medicine 17, 1998, method 3). Unlike p̂ ± z
// √(p̂(1-p̂)/n) it stays inside [0, 1] and does not shrink to a point at
// k = 0 or k = n.
func Wilson(k, n int, z float64) (lo, hi float64) {
	if n <= 0 {
		return 0, 1
	}
	nf := float64(n)
	p := float64(k) / nf
	z2 := z * z
	centre := (p + z2/(2*nf)) / (1 + z2/nf)
	half := z / (1 + z2/nf) * math.Sqrt(p*(1-p)/nf+z2/(4*nf*nf))
	lo, hi = math.Max(0, centre-half), math.Min(1, centre+half)
	// At k = 0 and k = n the bound is exactly 0 or 1; rounding must not
	// move it.
	if k == 0 {
		lo = 0
	}
	if k == n {
		hi = 1
	}
	return lo, hi
}

// TargetStats summarise one target's worst reading over the runs that
// could be solved.
type TargetStats struct {
	Target Target
	// Count is the number of runs with a reading; the moments and
	// quantiles are over them.
	Count     int
	Mean, Std float64 // sample mean and standard deviation (n - 1)
	Min, Max  float64
	// Quantiles at QuantileLevels, by linear interpolation between order
	// statistics (Hyndman and Fan, "Sample quantiles in statistical
	// packages", Am. Stat. 50, 1996, definition 7).
	Quantiles []float64
	// PassFraction is the fraction of all runs meeting this target (a
	// run without a reading does not).
	PassFraction float64
	Nominal      float64 // the nominal circuit's worst reading
	// LinearStd is the standard deviation the first-order sensitivities
	// predict (the law of propagation of uncertainty, JCGM 100:2008,
	// 5.1.2 and 5.2.2); NaN when a sensitivity could not be taken.
	LinearStd float64
}

// QuantileLevels are the probabilities of TargetStats.Quantiles.
var QuantileLevels = []float64{0.001, 0.01, 0.5, 0.99, 0.999}

// summarise counts the passes, the yield and its interval, and each
// target's statistics.
func (r *Result) summarise() {
	n := len(r.Runs)
	for i := range r.Runs {
		if r.Runs[i].Passed {
			r.Passed++
		}
		if r.Runs[i].Err != nil {
			r.Stats.Failed++
		}
		r.Stats.Redrawn += r.Runs[i].Redrawn
	}
	r.Yield = float64(r.Passed) / float64(n)
	r.Interval[0], r.Interval[1] = Wilson(r.Passed, n, z95)
	r.Targets = make([]TargetStats, len(r.Settings.Targets))
	xs := make([]float64, 0, n)
	for t := range r.Settings.Targets {
		ts := &r.Targets[t]
		ts.Target = r.Settings.Targets[t]
		ts.Nominal = r.Nominal[t]
		ts.LinearStd = math.NaN()
		xs = xs[:0]
		pass := 0
		for i := range r.Runs {
			v := r.Runs[i].Worst[t]
			if !math.IsNaN(v) {
				xs = append(xs, v)
			}
			if r.Runs[i].Err == nil && ts.Target.Passes(v) && !math.IsNaN(v) {
				pass++
			}
		}
		ts.PassFraction = float64(pass) / float64(n)
		ts.Count = len(xs)
		ts.Mean, ts.Std, ts.Min, ts.Max = math.NaN(), math.NaN(), math.NaN(), math.NaN()
		ts.Quantiles = make([]float64, len(QuantileLevels))
		for q := range ts.Quantiles {
			ts.Quantiles[q] = math.NaN()
		}
		if len(xs) == 0 {
			continue
		}
		ts.Mean, ts.Std = meanStd(xs)
		slices.Sort(xs)
		ts.Min, ts.Max = xs[0], xs[len(xs)-1]
		for q, p := range QuantileLevels {
			ts.Quantiles[q] = quantile(xs, p)
		}
	}
}

// meanStd returns the mean and the sample standard deviation (divisor
// n - 1; zero for one value), by Welford's update (Welford, Technometrics
// 4, 1962), which keeps its precision when the spread is small beside the
// mean.
func meanStd(xs []float64) (mean, std float64) {
	var m, s float64
	for i, x := range xs {
		d := x - m
		m += d / float64(i+1)
		s += d * (x - m)
	}
	if len(xs) < 2 {
		return m, 0
	}
	return m, math.Sqrt(s / float64(len(xs)-1))
}

// quantile returns the p-quantile of sorted xs by linear interpolation
// between order statistics: h = (n-1)p, x[⌊h⌋] + (h-⌊h⌋)(x[⌊h⌋+1] - x[⌊h⌋])
// (Hyndman and Fan 1996, definition 7).
func quantile(sorted []float64, p float64) float64 {
	n := len(sorted)
	if n == 1 {
		return sorted[0]
	}
	h := float64(n-1) * p
	i := int(math.Floor(h))
	if i >= n-1 {
		return sorted[n-1]
	}
	return sorted[i] + (h-float64(i))*(sorted[i+1]-sorted[i])
}
