package yield

import (
	"fmt"
	"math"
	"slices"

	"qpoint/ac/study"
	"qpoint/bias"
)

// SensitivityMethod names how the sensitivities are taken.
const SensitivityMethod = "central differences about the nominal circuit, step 1/100 of each value's standard deviation, of each target's worst reading over the temperatures"

// stepFraction is the difference step as a fraction of the value's
// standard deviation: small enough that the measure's curvature over the
// step is negligible, large enough that the bias solve's tolerance
// (1e-9 relative) stays far below the change it makes.
const stepFraction = 0.01

// Sensitivity is the first-order effect of one toleranced value on one
// target's measure.
type Sensitivity struct {
	Target int    // index into Settings.Targets
	Value  string // the toleranced value, e.g. R1.value
	// Tolerance indexes Circuit.Tolerances.
	Tolerance int
	// Coefficient is ∂M/∂x at the nominal circuit, in the measure's unit
	// per the value's SI unit.
	Coefficient float64
	// StdDev is the value's standard deviation u(x) (Tolerance.StdDev)
	// and Contribution c·u(x), the measure's first-order change for one
	// standard deviation of the value.
	StdDev, Contribution float64
	// Share is the value's share of the measure's first-order variance.
	// A value drawn on its own has c²u²/V; a member of a tolerance group
	// with correlation ρ carries c u ((1-ρ) c u + ρ Σ_g c_j u_j)/V, its
	// own term and half of each covariance term it takes part in, so that
	// the shares add up to one (the covariances of a group's values are
	// taken as ρ u_i u_j, exact for normal spreads and close for others).
	// A negative share is a value whose spread offsets a partner's.
	Share float64
}

// GroupShare is a tolerance group's share of one target's first-order
// variance: the sum of its members' shares.
type GroupShare struct {
	Target int
	Group  string
	Share  float64
}

// Corner is a worst-case corner for one target: every value at the end
// of its spread (Tolerance.Extreme) in the direction its sensitivity
// says worsens the target, the members of a fully correlated group
// together.
type Corner struct {
	Target  int
	Values  []float64 // for each of Circuit.Tolerances
	Reading float64   // the target's worst reading over the temperatures
	Passes  bool
	Err     error
}

// worstAt analyses the circuit with values at every temperature and
// returns each target's worst reading into dst.
func (r *Result) worstAt(ev *evaluator, w *study.Workspace, values, readings, dst []float64) error {
	var firstErr error
	var warnings []bias.Warning
	for k := range r.TemperaturesK {
		if _, err := ev.at(w, values, k, &ev.inst, readings, &warnings); err != nil && firstErr == nil {
			firstErr = err
		}
	}
	worstOf(r.Settings.Targets, readings, len(r.TemperaturesK), dst)
	return firstErr
}

// sensitivities takes each target's coefficient for each value by central
// differences, and the shares of the first-order variance.
func (r *Result) sensitivities(ev *evaluator, nominal []float64) {
	c := r.Circuit
	nt, nk := len(r.Settings.Targets), len(r.TemperaturesK)
	var w study.Workspace
	values := slices.Clone(nominal)
	readings := make([]float64, nt*nk)
	up, down := make([]float64, nt), make([]float64, nt)
	coef := make([][]float64, nt) // coef[t][k]
	for t := range coef {
		coef[t] = make([]float64, len(c.Tolerances))
	}
	for k := range c.Tolerances {
		tol := &c.Tolerances[k]
		h := stepFraction * tol.StdDev()
		values[k] = nominal[k] + h
		errUp := r.worstAt(ev, &w, values, readings, up)
		values[k] = nominal[k] - h
		errDown := r.worstAt(ev, &w, values, readings, down)
		values[k] = nominal[k]
		for t := range coef {
			coef[t][k] = (up[t] - down[t]) / (2 * h)
			if errUp != nil || errDown != nil {
				coef[t][k] = math.NaN()
			}
		}
	}
	for t := 0; t < nt; t++ {
		// u_k c_k for each value, and for each group Σ c_j u_j.
		cu := make([]float64, len(c.Tolerances))
		for k := range cu {
			cu[k] = coef[t][k] * c.Tolerances[k].StdDev()
		}
		sum := make([]float64, len(c.ToleranceGroups))
		for k := range cu {
			if g := c.Tolerances[k].Group; g >= 0 {
				sum[g] += cu[k]
			}
		}
		part := make([]float64, len(cu)) // each value's term before dividing by V
		variance := 0.0
		for k := range cu {
			part[k] = cu[k] * cu[k]
			if g := c.Tolerances[k].Group; g >= 0 {
				rho := c.ToleranceGroups[g].Correlation
				part[k] = cu[k] * ((1-rho)*cu[k] + rho*sum[g])
			}
			variance += part[k]
		}
		r.Targets[t].LinearStd = math.Sqrt(variance)
		if variance == 0 {
			variance = math.Inf(1) // no value moves the measure: every share is zero
		}
		for k := range cu {
			r.Sensitivities = append(r.Sensitivities, Sensitivity{Target: t, Value: c.Tolerances[k].Name, Tolerance: k,
				Coefficient: coef[t][k], StdDev: c.Tolerances[k].StdDev(), Contribution: cu[k], Share: part[k] / variance})
		}
		for g, grp := range c.ToleranceGroups {
			share := 0.0
			for _, k := range grp.Members {
				share += part[k] / variance
			}
			r.Groups = append(r.Groups, GroupShare{Target: t, Group: c.ToleranceGroups[g].Name, Share: share})
		}
	}
}

// Ranking returns target t's sensitivities, largest share first (ties in
// the order of the tolerances).
func (r *Result) Ranking(t int) []Sensitivity {
	var out []Sensitivity
	for _, s := range r.Sensitivities {
		if s.Target == t {
			out = append(out, s)
		}
	}
	slices.SortStableFunc(out, func(a, b Sensitivity) int {
		switch {
		case math.IsNaN(a.Share) && !math.IsNaN(b.Share):
			return 1
		case !math.IsNaN(a.Share) && math.IsNaN(b.Share):
			return -1
		case a.Share > b.Share:
			return -1
		case a.Share < b.Share:
			return 1
		}
		return 0
	})
	return out
}

// corners analyses each limited target's worst-case corner.
func (r *Result) corners(ev *evaluator, nominal []float64) {
	c := r.Circuit
	nt, nk := len(r.Settings.Targets), len(r.TemperaturesK)
	var w study.Workspace
	readings := make([]float64, nt*nk)
	worst := make([]float64, nt)
	for t := range r.Settings.Targets {
		tg := &r.Settings.Targets[t]
		if tg.Bound == Observe {
			continue
		}
		// worsen is the sign of a change that worsens the target.
		worsen := -1.0
		if tg.Bound == AtMost {
			worsen = 1
		}
		coef := func(k int) float64 { return r.Sensitivities[t*len(c.Tolerances)+k].Coefficient }
		values := slices.Clone(nominal)
		for k := range c.Tolerances {
			tol := &c.Tolerances[k]
			if g := tol.Group; g >= 0 && c.ToleranceGroups[g].Correlation == 1 {
				// The group moves as one: the direction whose
				// first-order effect on the measure worsens it.
				effect := 0.0
				for _, j := range c.ToleranceGroups[g].Members {
					effect += coef(j) * (c.Tolerances[j].Extreme(1) - c.Tolerances[j].Nominal)
				}
				if effect != 0 && !math.IsNaN(effect) {
					values[k] = tol.Extreme(math.Copysign(1, effect*worsen))
				}
				continue
			}
			if a := coef(k); a != 0 && !math.IsNaN(a) {
				values[k] = tol.Extreme(math.Copysign(1, a*worsen))
			}
		}
		err := r.worstAt(ev, &w, values, readings, worst)
		r.Corners = append(r.Corners, Corner{Target: t, Values: values, Reading: worst[t],
			Passes: err == nil && tg.Passes(worst[t]), Err: err})
	}
}

// cautions collects what the reader must know.
func (r *Result) cautions() {
	n := len(r.Runs)
	pct := func(k int) string { return fmt.Sprintf("%.3g %%", 100*float64(k)/float64(n)) }
	if r.Stats.Failed > 0 {
		var first error
		for i := range r.Runs {
			if r.Runs[i].Err != nil {
				first = r.Runs[i].Err
				break
			}
		}
		r.Cautions = append(r.Cautions, Caution{Kind: RunsFailed, Count: r.Stats.Failed,
			Message: fmt.Sprintf("%d runs (%s) could not be analysed and count as failing; the first: %v", r.Stats.Failed, pct(r.Stats.Failed), first)})
	}
	if r.Stats.Redrawn > 0 {
		runs := 0
		for i := range r.Runs {
			if r.Runs[i].Redrawn > 0 {
				runs++
			}
		}
		r.Cautions = append(r.Cautions, Caution{Kind: Redrawn, Count: runs,
			Message: fmt.Sprintf("%d draws in %d runs put a value outside its accepted range and were drawn again: those distributions are cut off there", r.Stats.Redrawn, runs)})
	}
	// Stress: each part and kind once, with the runs that showed it.
	type key struct {
		part string
		kind bias.WarningKind
	}
	counts := map[key]int{}
	first := map[key]string{}
	var order []key
	for i := range r.Runs {
		for _, x := range r.Runs[i].Warnings {
			if x.Kind == bias.LeakageDominated {
				continue
			}
			k := key{x.Part, x.Kind}
			if counts[k] == 0 {
				order = append(order, k)
				first[k] = x.Message
			}
			counts[k]++
		}
	}
	for _, k := range order {
		r.Cautions = append(r.Cautions, Caution{Kind: PartStress, Part: k.part, Count: counts[k],
			Message: fmt.Sprintf("%s: %s in %d runs (%s), e.g. %s", k.part, k.kind, counts[k], pct(counts[k]), first[k])})
	}
	for t := range r.Targets {
		ts := &r.Targets[t]
		if math.IsNaN(ts.LinearStd) {
			r.Cautions = append(r.Cautions, Caution{Kind: NoSensitivity, Part: ts.Target.Text,
				Message: fmt.Sprintf("%s: a sensitivity could not be taken (the measure could not be read at a nearby value)", ts.Target.Text)})
			continue
		}
		if ts.Count > 30 && ts.Std > 0 && math.Abs(ts.Std/ts.LinearStd-1) > 0.2 {
			r.Cautions = append(r.Cautions, Caution{Kind: Nonlinear, Part: ts.Target.Text,
				Message: fmt.Sprintf("%s: the runs spread by %.4g (standard deviation) where the first-order sensitivities predict %.4g: the measure is not linear over the tolerances, so the shares and corners are rough",
					ts.Target.Text, ts.Std, ts.LinearStd)})
		}
	}
}

// TemperatureIndex returns the index of the temperature nearest tempK.
func (r *Result) TemperatureIndex(tempK float64) int {
	best := 0
	for k, t := range r.TemperaturesK {
		if math.Abs(t-tempK) < math.Abs(r.TemperaturesK[best]-tempK) {
			best = k
		}
	}
	return best
}
