package report

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"qpoint/ac/yield"
	"qpoint/bias/circuit"
	"qpoint/plots"
)

// YieldFigures draws a histogram of each target's worst reading.
func YieldFigures(r *yield.Result) []*plots.Figure {
	var figs []*plots.Figure
	for t := range r.Targets {
		figs = append(figs, plots.YieldHistogram(r, t))
	}
	return figs
}

// TemperatureList prints the temperatures in degrees Celsius.
func TemperatureList(ks []float64) string {
	var parts []string
	for _, k := range ks {
		parts = append(parts, fmt.Sprintf("%.2f °C", Celsius(k)))
	}
	return strings.Join(parts, ", ")
}

// PercentOf prints a fraction as a percentage with enough digits for a
// yield near 100 %.
func PercentOf(f float64) string {
	if math.IsNaN(f) {
		return "—"
	}
	if math.Abs(f) < 5e-5 {
		f = 0 // no "-0.00 %" for a share that differences leave a hair below zero
	}
	return strconv.FormatFloat(100*f, 'f', 2, 64) + " %"
}

// YieldTargetTable lists each target's spread: nominal, mean, standard
// deviation beside its first-order estimate, quantiles and runs meeting it.
func YieldTargetTable(r *yield.Result) *Table {
	t := &Table{Caption: "Targets (each run's worst reading over the temperatures)",
		Header: []string{"target", "nominal", "mean", "std dev", "first-order std dev", "0.1 %", "99.9 %", "runs meeting it"}}
	lo, hi := slices.Index(yield.QuantileLevels, 0.001), slices.Index(yield.QuantileLevels, 0.999)
	for _, ts := range r.Targets {
		u := ts.Target.Measure.Unit
		pass := PercentOf(ts.PassFraction)
		if ts.Target.Bound == yield.Observe {
			pass = "(no limit)"
		}
		t.Add(ts.Target.Text, FormatMeasure(ts.Nominal, u), FormatMeasure(ts.Mean, u), FormatSpread(ts.Std, u),
			FormatSpread(ts.LinearStd, u), FormatMeasure(ts.Quantiles[lo], u), FormatMeasure(ts.Quantiles[hi], u), pass)
	}
	return t
}

// YieldShareTable ranks the values by their largest share of any
// target's variance.
func YieldShareTable(r *yield.Result) *Table {
	t := &Table{Caption: "Which value to tighten: share of each target's variance (first order, central differences)",
		Header: []string{"value", "spread"}}
	for _, ts := range r.Targets {
		t.Header = append(t.Header, ts.Target.Text)
	}
	c := r.Circuit
	nv := len(c.Tolerances)
	best := make([]float64, nv)
	for k := range best {
		best[k] = math.Inf(-1)
		for ti := range r.Targets {
			if s := r.Sensitivities[ti*nv+k].Share; s > best[k] {
				best[k] = s
			}
		}
	}
	order := make([]int, nv)
	for k := range order {
		order[k] = k
	}
	slices.SortStableFunc(order, func(a, b int) int {
		switch {
		case best[a] > best[b]:
			return -1
		case best[a] < best[b]:
			return 1
		}
		return 0
	})
	for _, k := range order {
		tol := &c.Tolerances[k]
		row := []string{tol.Name, SpreadText(tol)}
		for ti := range r.Targets {
			row = append(row, PercentOf(r.Sensitivities[ti*nv+k].Share))
		}
		t.Add(row...)
	}
	for gi, g := range c.ToleranceGroups {
		row := []string{"group " + g.Name, fmt.Sprintf("ρ = %g", g.Correlation)}
		for ti := range r.Targets {
			row = append(row, PercentOf(r.Groups[ti*len(c.ToleranceGroups)+gi].Share))
		}
		t.Add(row...)
	}
	return t
}

// YieldCornerTable lists each target's worst-case corner beside its
// nominal value and worst run.
func YieldCornerTable(r *yield.Result) *Table {
	t := &Table{Caption: "Worst-case corners (each value at its band's end or 3 σ, the way that worsens the target)",
		Header: []string{"target", "limit", "nominal", "corner", "worst run", "corner meets it"}}
	for _, cn := range r.Corners {
		ts := r.Targets[cn.Target]
		u := ts.Target.Measure.Unit
		worst := ts.Min
		if ts.Target.Bound == yield.AtMost {
			worst = ts.Max
		}
		verdict := "yes"
		if !cn.Passes {
			verdict = "no"
		}
		if cn.Err != nil {
			verdict = "not solved"
		}
		t.Add(ts.Target.Text, FormatMeasure(ts.Target.Limit, u), FormatMeasure(ts.Nominal, u), FormatMeasure(cn.Reading, u), FormatMeasure(worst, u), verdict)
	}
	return t
}

// FormatSpread prints a standard deviation: dB figures with three
// decimals, the rest with SI prefixes.
func FormatSpread(v float64, unit string) string {
	if math.IsNaN(v) {
		return "—"
	}
	switch unit {
	case "dB", "dBc", "dBm":
		return strconv.FormatFloat(v, 'f', 3, 64) + " " + unit
	}
	return FormatMeasure(v, unit)
}

// SpreadText says how a value spreads, as the file wrote it.
func SpreadText(t *circuit.Tolerance) string {
	switch t.Distribution {
	case circuit.Uniform:
		return "±" + t.Text + " band"
	case circuit.Normal:
		return "σ " + t.Text
	}
	return "σ(ln) " + t.Text
}
