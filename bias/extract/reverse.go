package extract

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"

	"qpoint/bias/diode"
	"qpoint/bias/measured"
	"qpoint/bias/si"
)

// Thresholds of the reverse fit.
const (
	// breakdownRise: a reverse point is in breakdown when its current
	// exceeds the leakage at low reverse bias this many times.
	breakdownRise = 10
	// leakageRise: measured leakage this many times the model's I_S
	// earns a LeakageAboveModel caution.
	leakageRise = 10
)

// fitBreakdown fits the breakdown knee to the reverse points at T0 that
// rise into breakdown, setting model's BreakdownVoltage and
// BreakdownCurrent, or says why it leaves the model without a knee.
func fitBreakdown(d Data, s Settings, fw *forwardFit, model *diode.Params, r *Result) {
	dev := diode.New(*model, fw.t0)
	nvt := dev.NVT()
	var ks []int
	elsewhere := 0
	for k, p := range d.Current {
		switch {
		case p.Voltage >= 0:
		case p.Value == 0:
			r.Cautions = append(r.Cautions, Caution{Kind: PointLeftOut, Set: measured.CurrentVoltage, Index: k,
				Message: at(p) + fmt.Sprintf("zero current at %.6g V cannot be placed on a logarithmic scale; the point is left out", p.Voltage)})
		case s.tempOf(p) != fw.t0:
			elsewhere++
		default:
			ks = append(ks, k)
		}
	}
	if elsewhere > 0 {
		r.Cautions = append(r.Cautions, Caution{Kind: PointLeftOut, Index: -1, Message: fmt.Sprintf(
			"%d reverse points at temperatures other than measured_at (%s) are not fitted: the model's knee does not move with temperature", elsewhere, si.Format(fw.t0, "K", 5))})
	}
	r.found["breakdown_voltage"] = Value{Status: Default, Error: math.NaN()}
	r.found["breakdown_current"] = Value{Status: Default, Error: math.NaN()}
	if len(ks) == 0 {
		r.Cautions = append(r.Cautions, Caution{Kind: NotDetermined, Key: "breakdown_voltage", Index: -1,
			Message: "no reverse I–V points at measured_at: the model is left without a breakdown knee"})
		return
	}
	slices.SortFunc(ks, func(a, b int) int { return cmpFloat(-d.Current[a].Voltage, -d.Current[b].Voltage) })
	mag := func(k int) float64 { return -d.Current[k].Value }
	// The leakage at low reverse bias: the lowest points beyond 5 n V_T,
	// where the ideal reverse current has reached -I_S.
	var low []int
	for _, k := range ks {
		if -d.Current[k].Voltage >= 5*nvt {
			low = append(low, k)
		}
	}
	floor := dev.SaturationCurrent
	if len(low) > 0 {
		var m []float64
		for _, k := range low[:min(3, len(low))] {
			m = append(m, mag(k))
		}
		floor = math.Max(floor, median(m))
	}
	j := len(ks)
	for j > 0 && mag(ks[j-1]) >= breakdownRise*floor {
		j--
	}
	knee := ks[j:]
	worst, worstAt := 0.0, 0.0
	for _, k := range low {
		if slices.Contains(knee, k) {
			continue
		}
		if ratio := mag(k) / dev.SaturationCurrent; ratio > worst {
			worst, worstAt = ratio, d.Current[k].Voltage
		}
	}
	if worst > leakageRise {
		r.Cautions = append(r.Cautions, Caution{Kind: LeakageAboveModel, Key: "saturation_current", Index: -1, Message: fmt.Sprintf(
			"measured reverse leakage reaches %.3g times the model's saturation current (at %s), and the model has no other leakage path: at reverse bias the model's junction resistance is that much higher than the part's",
			worst, si.Format(worstAt, "V", 4))})
	}
	deepest := d.Current[ks[len(ks)-1]].Voltage
	if len(knee) < minBreakdown {
		msg := fmt.Sprintf("the reverse points down to %s stay below breakdown (none rises to %d times the leakage at low reverse bias): the model is left without a knee",
			si.Format(deepest, "V", 4), breakdownRise)
		if len(knee) > 0 {
			msg = fmt.Sprintf("only %d reverse points rise into breakdown; at least %d determine the knee: the model is left without one", len(knee), minBreakdown)
		}
		r.Cautions = append(r.Cautions, Caution{Kind: NotDetermined, Key: "breakdown_voltage", Index: -1, Message: msg})
		return
	}
	lo, hi := mag(knee[0]), mag(knee[len(knee)-1])
	for _, k := range knee {
		lo, hi = math.Min(lo, mag(k)), math.Max(hi, mag(k))
	}
	current := roundWithin(lo, hi)

	// Start: the reverse voltage where the points cross the knee current,
	// by linear interpolation of ln |I|, less the drop on R_S.
	start := -d.Current[knee[len(knee)-1]].Voltage
	for a := 0; a+1 < len(knee); a++ {
		p, q := d.Current[knee[a]], d.Current[knee[a+1]]
		la, lb, lc := math.Log(-p.Value), math.Log(-q.Value), math.Log(current)
		if (la-lc)*(lb-lc) <= 0 && la != lb {
			start = -(p.Voltage + (q.Voltage-p.Voltage)*(lc-la)/(lb-la))
			break
		}
	}
	start = math.Max(start-current*model.SeriesResistance, 2*nvt)

	p := *model
	p.BreakdownCurrent = current
	bp := &lsq{
		residuals: len(knee),
		free:      []bool{true},
		lo:        []float64{nvt}, hi: []float64{1e6}, scale: []float64{1},
		eval: func(x, res []float64, jac *mat.Dense) {
			q := p
			q.BreakdownVoltage = x[0]
			dv := diode.New(q, fw.t0)
			for j, k := range knee {
				pt := d.Current[k]
				cur, vj := dv.TerminalCurrent(pt.Voltage)
				cur = math.Min(cur, -math.SmallestNonzeroFloat64)
				res[j] = math.Log(-cur) - math.Log(-pt.Value)
				if jac != nil {
					// ∂i_b/∂V_BV = -i_b/(n V_T); through R_S divided by 1 + R_S g.
					di := -dv.BreakdownCurrent(vj).Value / nvt / (1 + q.SeriesResistance*dv.Current(vj).D1)
					jac.Set(j, 0, di/cur)
				}
			}
		},
	}
	x := []float64{start}
	st, err := bp.marquardt(x, s.MaxIterations)
	r.Stats.Iterations += st.iterations
	r.Stats.Evaluations += st.evaluations
	res := make([]float64, len(knee))
	jac := mat.NewDense(len(knee), 1, nil)
	bp.eval(x, res, jac)
	cov, ok := covariance(jac, res, []int{0})
	if err != nil || !ok || x[0] <= bp.lo[0] {
		r.Cautions = append(r.Cautions, Caution{Kind: NotDetermined, Key: "breakdown_voltage", Index: -1, Message: fmt.Sprintf(
			"the %d points in breakdown do not determine the knee: the model is left without one", len(knee))})
		return
	}
	model.BreakdownVoltage, model.BreakdownCurrent = x[0], current
	r.found["breakdown_voltage"] = Value{Value: x[0], Error: math.Sqrt(cov.At(0, 0)), Status: Fitted}
	r.found["breakdown_current"] = Value{Value: current, Error: math.NaN(), Status: Chosen}
	for j, k := range knee {
		pt := d.Current[k]
		r.Breakdown = append(r.Breakdown, Residual{Index: k, Voltage: pt.Voltage, Measured: pt.Value,
			Model: pt.Value * math.Exp(res[j]), TemperatureK: fw.t0, Residual: res[j]})
	}
	if got, fwd := rms(r.Breakdown), rms(r.Forward); got > math.Max(3*fwd, 0.05) {
		r.Cautions = append(r.Cautions, Caution{Kind: BreakdownShape, Key: "breakdown_voltage", Index: -1, Message: fmt.Sprintf(
			"the points in breakdown depart from the model's knee by %.1f %% rms (the forward points by %.1f %%): the model's knee rises by e per n V_T = %s and the part's does not; the model holds near %s",
			100*got, 100*fwd, si.Format(nvt, "V", 3), si.Format(current, "A", 3))})
	}
}

// roundWithin returns a round current in [lo, hi]: the circuit file's
// default knee current, 1 mA, when it lies there, else the 1-2-5 value
// nearest the geometric middle, else the middle itself to two digits.
func roundWithin(lo, hi float64) float64 {
	if lo <= 1e-3 && 1e-3 <= hi {
		return 1e-3
	}
	mid := math.Sqrt(lo * hi)
	best, bestDist := 0.0, math.Inf(1)
	for e := math.Floor(math.Log10(lo)) - 1; e <= math.Ceil(math.Log10(hi))+1; e++ {
		for _, m := range []float64{1, 2, 5} {
			c := m * math.Pow(10, e)
			if c >= lo && c <= hi {
				if dist := math.Abs(math.Log(c / mid)); dist < bestDist {
					best, bestDist = c, dist
				}
			}
		}
	}
	if best > 0 {
		return best
	}
	e := math.Pow(10, math.Floor(math.Log10(mid))-1)
	return math.Round(mid/e) * e
}
