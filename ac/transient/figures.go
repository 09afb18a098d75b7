package transient

import (
	"fmt"
	"math"
	"math/cmplx"

	"qpoint/ac/steady"
	"qpoint/bias/si"
	"qpoint/smallsignal"
)

// Thresholds of the figures and their cautions.
const (
	spikeMarginDB     = 1.0  // a spike stands more than this above the flat leakage, dB
	flatPeriods       = 20   // at most this many carrier periods for the flat leakage
	flatDriftDB       = 0.1  // the flat leakage's last two windows agree within this
	probeMatchDB      = 0.1  // the probe's loss before the pulse against the small-signal loss
	steadyMatchDB     = 0.5  // a detector's settled video against the steady-state shift
	imbalanceCaution  = 1e-2 // the energy account's imbalance
	pulseToPulseDB    = 0.2  // the last two pulses' flat leakage
	pulseToPulseShare = 0.1  // the last two pulses' recovery, relative
	blockShare        = 0.01 // a DC block's mean current against its peak
)

// read takes the figures from run r.
func (res *PulseResult) read(nw *smallsignal.Network, r *Result, outNode, outReturn int) {
	res.Run = r
	s := res.Settings
	p := s.Pulse
	y := outputOf(r, outReturn >= 0)
	res.Output = y
	if len(r.Times) < 2 {
		return
	}
	tc := 1 / p.CarrierHz
	wc := newWaveform(r.Times, y, 2*math.Pi*p.CarrierHz)
	var wp *waveform
	probeWindow := 0.0
	if p.ProbeEMF != 0 {
		wp = wc
		if p.ProbeHz != p.CarrierHz {
			wp = newWaveform(r.Times, y, 2*math.Pi*p.ProbeHz)
		}
		probeWindow = probePeriods / p.ProbeHz
	}
	t0, t1 := wc.span()
	rOut := math.NaN()
	if s.Output.Port >= 0 {
		rOut = nw.Ports[s.Output.Port].Impedance
	} else if res.Kind == Limiter {
		res.caution(Caution{Kind: NodeOutput, Value: math.NaN(), Limit: math.NaN(),
			Message: "the output is a node, not a port: no power is delivered anywhere to measure, so the leakage figures are not given; the envelope is in volts"})
	}
	power := func(a float64) float64 { return a * a / (2 * rOut) }

	// The probe's amplitude before the first pulse.
	before := math.NaN()
	if wp != nil && p.Start(0) <= t1 && p.Start(0)-probeWindow >= t0 {
		_, ph := wp.window(p.Start(0)-probeWindow, p.Start(0))
		before = cmplx.Abs(ph)
		res.LossBefore = lossDB(nw, s.Input, s.Output, ph, p.ProbeEMF)
		if d := res.LossBefore - res.SmallSignalLoss; math.Abs(d) > probeMatchDB {
			res.caution(Caution{Kind: ProbeMismatch, Value: res.LossBefore, Limit: res.SmallSignalLoss,
				Message: fmt.Sprintf("the probe's loss before the pulse, %.3f dB, differs from the small-signal loss %.3f dB by %.2f dB: the probe is not small at this bias, or the tolerance is loose; the recovery is read against the former",
					res.LossBefore, res.SmallSignalLoss, d)})
		}
	}

	// The envelope grid.
	dt := math.Max(tc/2, (t1-t0)/maxEnvelopePoints)
	overlaps := func(a, b float64) bool {
		for k := 0; k < p.count(); k++ {
			c := p.Corners(k)
			if a < c[3] && b > c[0] {
				return true
			}
		}
		return false
	}
	reach := smoothedReach * tc
	preach := smoothedReach * probeWindow
	for t := t0 + reach; t+reach <= t1; t += dt {
		mean, ph := wc.smoothed(t, tc)
		res.EnvelopeTimes = append(res.EnvelopeTimes, t)
		res.Envelope = append(res.Envelope, cmplx.Abs(ph))
		res.Video = append(res.Video, mean)
		change := math.NaN()
		if wp != nil && before > 0 && t-preach >= t0 && t+preach <= t1 && !overlaps(t-preach, t+preach) {
			_, pp := wp.smoothed(t, probeWindow)
			change = 20 * math.Log10(before/cmplx.Abs(pp))
		}
		res.LossChange = append(res.LossChange, change)
	}

	unresolved, notRecovered := false, false
	for k := 0; k < p.count(); k++ {
		c := p.Corners(k)
		if c[0] >= t1 {
			break
		}
		f := Figures{Pulse: k, Start: c[0], RiseEnd: c[1], FallStart: c[2], End: c[3],
			SpikePeak: math.NaN(), SpikeTime: math.NaN(), SpikeEnergy: math.NaN(), Flat: math.NaN(),
			Recovery1dB: math.NaN(), Recovery3dB: math.NaN(), Settled: math.NaN(), RiseTime: math.NaN(), FallTime: math.NaN()}
		limit := t1 // the end of what belongs to this pulse
		if k+1 < p.count() {
			limit = math.Min(t1, p.Start(k+1))
		}
		if res.Kind == Limiter && c[2] <= t1 {
			res.limiter(&f, wc, power, tc, limit)
			if wp != nil && !math.IsNaN(before) {
				for _, lim := range []struct {
					db    float64
					dst   *float64
					bound *bool
				}{{1, &f.Recovery1dB, &f.Recovery1dBBound}, {3, &f.Recovery3dB, &f.Recovery3dBBound}} {
					v, state := res.recovery(c[3], limit, probeWindow, lim.db)
					*lim.dst, *lim.bound = v, state == recoveryBound
					unresolved = unresolved || state == recoveryBound
					notRecovered = notRecovered || (state == recoveryNone && limit >= c[3]+probeWindow)
				}
			}
		}
		if res.Kind == Detector && c[2] <= t1 {
			res.detector(&f, wc, tc, limit)
		}
		res.Pulses = append(res.Pulses, f)
	}
	if n := len(res.Pulses); n > 0 {
		res.Figures = res.Pulses[n-1]
		if n >= 2 {
			a, b := res.Pulses[n-2], res.Pulses[n-1]
			flat := 10 * math.Log10(b.Flat/a.Flat)
			rec := math.Abs(b.Recovery1dB-a.Recovery1dB) / b.Recovery1dB
			if math.Abs(flat) > pulseToPulseDB || rec > pulseToPulseShare {
				res.caution(Caution{Kind: PulseToPulse, Value: flat, Limit: pulseToPulseDB,
					Message: fmt.Sprintf("the last two pulses differ (flat leakage by %.2f dB, recovery by %.0f %%): the train had not settled; run more pulses", flat, 100*rec)})
			}
		}
	}
	if unresolved {
		res.caution(Caution{Kind: RecoveryUnresolved, Value: probeWindow / 2, Limit: math.NaN(),
			Message: fmt.Sprintf("the probe's loss was back within the limit at the first instant it could be read after the pulse (its window is one probe period, %s): the recovery time given is an upper bound", si.Format(probeWindow, "s", 3))})
	}
	if notRecovered {
		res.caution(Caution{Kind: NotRecovered, Value: t1, Limit: math.NaN(),
			Message: fmt.Sprintf("the probe's loss had not come back within the limit by %s, the end of the run (or the next pulse): the recovery time is longer; follow the circuit for longer", si.Format(t1, "s", 4))})
	}
	res.stress(nw, r)
	res.blocks(nw, r)
	if r.Energy.Imbalance > imbalanceCaution {
		res.caution(Caution{Kind: EnergyImbalance, Value: r.Energy.Imbalance, Limit: imbalanceCaution,
			Message: fmt.Sprintf("the run's energy account is off by %.2g of its size: the tolerance is loose for these figures; tighten it", r.Energy.Imbalance)})
	}
}

func (res *PulseResult) caution(c Caution) { res.Cautions = append(res.Cautions, c) }

// limiter reads the spike and the flat leakage of one pulse.
func (res *PulseResult) limiter(f *Figures, wc *waveform, power func(float64) float64, tc, limit float64) {
	flatLen := f.FallStart - f.RiseEnd
	periods := math.Max(1, math.Floor(math.Min(flatLen/4, flatPeriods*tc)/tc))
	l := periods * tc
	a := math.Max(f.FallStart-l, f.Start)
	_, ph := wc.window(a, f.FallStart)
	f.Flat = power(cmplx.Abs(ph))
	if a-l >= f.RiseEnd {
		_, prev := wc.window(a-l, a)
		if d := 20 * math.Log10(cmplx.Abs(ph)/cmplx.Abs(prev)); math.Abs(d) > flatDriftDB {
			res.caution(Caution{Kind: NotSettled, Value: d, Limit: flatDriftDB,
				Message: fmt.Sprintf("pulse %d: the flat leakage was still changing at the end of the flat top (%+.2f dB over its last %s): a longer pulse may leak more or less", f.Pulse+1, d, si.Format(l, "s", 3))})
		}
	}
	if math.IsNaN(f.Flat) {
		return
	}
	// The spike: the highest envelope power from the start to the middle
	// of the flat top.
	mid := f.RiseEnd + flatLen/2
	peak, at := math.Inf(-1), -1
	for i, t := range res.EnvelopeTimes {
		if t >= f.Start && t <= mid {
			if pw := power(res.Envelope[i]); pw > peak {
				peak, at = pw, i
			}
		}
	}
	if at < 0 {
		return
	}
	f.SpikePeak, f.SpikeTime = peak, res.EnvelopeTimes[at]
	f.SpikeEnergy = 0
	margin := f.Flat * math.Pow(10, spikeMarginDB/10)
	if peak <= margin {
		return
	}
	// Energy above the flat leakage from the start until the power falls
	// back to within the margin after the peak.
	prevT, prevP := f.Start, 0.0
	for i, t := range res.EnvelopeTimes {
		if t < f.Start {
			continue
		}
		pw := math.Max(power(res.Envelope[i])-f.Flat, 0)
		f.SpikeEnergy += (t - prevT) * (pw + prevP) / 2
		prevT, prevP = t, pw
		if i > at && power(res.Envelope[i]) <= margin {
			break
		}
	}
}

// Recovery outcomes.
const (
	recoveryFound = iota
	recoveryBound // within the limit at the first readable instant
	recoveryNone  // not within the limit by the end
)

// recovery returns the time from end until the probe's loss change is
// back, for good, within db: the last grid point outside the band before
// limit, interpolated to where it crosses.
func (res *PulseResult) recovery(end, limit, window, db float64) (float64, int) {
	first, last := -1, -1
	for i, t := range res.EnvelopeTimes {
		if t < end+smoothedReach*window || t+smoothedReach*window > limit || math.IsNaN(res.LossChange[i]) {
			continue
		}
		if first < 0 {
			first = i
		}
		if math.Abs(res.LossChange[i]) > db {
			last = i
		}
	}
	switch {
	case first < 0:
		return math.NaN(), recoveryNone
	case last < 0:
		return res.EnvelopeTimes[first] - end, recoveryBound
	}
	j := last + 1
	if j >= len(res.EnvelopeTimes) || math.IsNaN(res.LossChange[j]) || res.EnvelopeTimes[j]+smoothedReach*window > limit {
		return math.NaN(), recoveryNone
	}
	a, b := math.Abs(res.LossChange[last]), math.Abs(res.LossChange[j])
	ta, tb := res.EnvelopeTimes[last], res.EnvelopeTimes[j]
	return ta + (tb-ta)*(a-db)/(a-b) - end, recoveryFound
}

// detector reads the video output's settled change, rise and fall.
func (res *PulseResult) detector(f *Figures, wc *waveform, tc, limit float64) {
	mean, _ := wc.window(math.Max(f.FallStart-tc, f.Start), f.FallStart)
	f.Settled = mean - res.Baseline
	ref := res.SteadyShift
	if math.IsNaN(ref) {
		ref = f.Settled
	}
	if ref == 0 || f.Settled == 0 {
		return
	}
	// cross returns the first grid time in [a, b] where the video change
	// over scale passes level in the direction given, interpolated.
	cross := func(a, b, scale, level float64, rising bool) float64 {
		prevT, prevV := math.NaN(), math.NaN()
		for i, t := range res.EnvelopeTimes {
			if t < a || t > b {
				continue
			}
			v := (res.Video[i] - res.Baseline) / scale
			if (rising && v >= level) || (!rising && v <= level) {
				if math.IsNaN(prevT) {
					return t
				}
				return prevT + (t-prevT)*(level-prevV)/(v-prevV)
			}
			prevT, prevV = t, v
		}
		return math.NaN()
	}
	t10 := cross(f.Start, f.FallStart, ref, 0.1, true)
	t90 := cross(f.Start, f.FallStart, ref, 0.9, true)
	f.RiseTime = t90 - t10
	if !math.IsNaN(res.SteadyShift) {
		d := 20 * math.Log10(f.Settled/res.SteadyShift)
		if math.IsNaN(d) || math.Abs(d) > steadyMatchDB {
			res.caution(Caution{Kind: SteadyMismatch, Value: f.Settled, Limit: res.SteadyShift,
				Message: fmt.Sprintf("pulse %d: the video change at the end of the flat top, %s, is %.2f dB from the steady-state DC shift %s under the continuous carrier: the pulse is too short for the video to settle",
					f.Pulse+1, si.Format(f.Settled, "V", 4), d, si.Format(res.SteadyShift, "V", 4))})
		}
	}
	if math.IsNaN(t90) {
		res.caution(Caution{Kind: NotSettled, Value: f.Settled / ref, Limit: 0.9,
			Message: fmt.Sprintf("pulse %d: the video reached only %.0f %% of its final change within the pulse, so its 10-90 %% rise time is not given", f.Pulse+1, 100*f.Settled/ref)})
	}
	f90 := cross(f.FallStart, limit, f.Settled, 0.9, false)
	f10 := cross(f.FallStart, limit, f.Settled, 0.1, false)
	f.FallTime = f10 - f90
	if math.IsNaN(f10) {
		res.caution(Caution{Kind: NotRecovered, Value: limit, Limit: math.NaN(),
			Message: fmt.Sprintf("pulse %d: the video had not fallen to 10 %% of its change by %s, so its fall time is not given; follow the circuit for longer", f.Pulse+1, si.Format(limit, "s", 4))})
	}
}

// stress reads each diode's extremes and its dissipation per pulse and
// cautions against its ratings.
func (res *PulseResult) stress(nw *smallsignal.Network, r *Result) {
	p := res.Settings.Pulse
	for k, d := range nw.Diodes {
		tr := r.Diodes[k]
		st := DiodeStress{Name: d.Name}
		rs := d.SeriesResistance
		pw := func(i int) float64 {
			v := tr.Junction[i]
			e := v * tr.Current[i]
			if rs > 0 {
				u := tr.Terminal[i] - v
				e += u * u / rs
			}
			return e
		}
		knee := d.Device.Params.BreakdownVoltage > 0
		for i := range r.Times {
			if tr.Current[i] > st.PeakCurrent {
				st.PeakCurrent, st.PeakCurrentTime = tr.Current[i], r.Times[i]
			}
			st.PeakReverseVoltage = math.Max(st.PeakReverseVoltage, -tr.Terminal[i])
			if knee && i > 0 && -d.Device.BreakdownCurrent(tr.Junction[i]).Value > d.Device.SaturationCurrent {
				st.PastKnee += r.Times[i] - r.Times[i-1]
			}
		}
		for q := 0; q < p.count(); q++ {
			c := p.Corners(q)
			e, span := 0.0, 0.0
			for i := 1; i < len(r.Times); i++ {
				if r.Times[i-1] >= c[0] && r.Times[i] <= c[3] {
					h := r.Times[i] - r.Times[i-1]
					e += h * (pw(i-1) + pw(i)) / 2
					span += h
				}
			}
			if span > 0 {
				st.PulsePower = math.Max(st.PulsePower, e/span)
			}
		}
		res.Diodes = append(res.Diodes, st)

		rt := d.Device.Params.Ratings
		add := func(kind CautionKind, v, l float64, format string, args ...any) {
			res.caution(Caution{Kind: kind, Part: d.Name, Value: v, Limit: l, Message: d.Name + ": " + fmt.Sprintf(format, args...)})
		}
		if rt.MaxCurrent > 0 && st.PeakCurrent > rt.MaxCurrent {
			add(CurrentRating, st.PeakCurrent, rt.MaxCurrent, "peak junction current %s exceeds its %s rating (%.0f%%) at t = %s",
				si.Format(st.PeakCurrent, "A", 3), si.Format(rt.MaxCurrent, "A", 3), 100*st.PeakCurrent/rt.MaxCurrent, si.Format(st.PeakCurrentTime, "s", 4))
		}
		if rt.MaxCurrent == 0 && d.Device.ZeroBiasCapacitance > 0 {
			if lim := steady.OverdriveCurrent(d.Device.ZeroBiasCapacitance); st.PeakCurrent > lim {
				add(SmallJunction, st.PeakCurrent, lim, "peak junction current %s; its model gives no current rating, and a junction of its %s zero-bias capacitance is overdriven above about %s",
					si.Format(st.PeakCurrent, "A", 3), si.Format(d.Device.ZeroBiasCapacitance, "F", 3), si.Format(lim, "A", 3))
			}
		}
		if rt.MaxReverseVoltage > 0 && st.PeakReverseVoltage > rt.MaxReverseVoltage {
			add(ReverseRating, st.PeakReverseVoltage, rt.MaxReverseVoltage, "peak reverse voltage %s exceeds its %s rating (%.0f%%)",
				si.Format(st.PeakReverseVoltage, "V", 3), si.Format(rt.MaxReverseVoltage, "V", 3), 100*st.PeakReverseVoltage/rt.MaxReverseVoltage)
		}
		if rt.MaxPower > 0 && st.PulsePower > rt.MaxPower {
			add(PowerRating, st.PulsePower, rt.MaxPower, "mean dissipation over the pulse %s exceeds its %s rating (%.0f%%); the rating is for continuous power, and a pulse rating, where the maker gives one, may allow more",
				si.Format(st.PulsePower, "W", 3), si.Format(rt.MaxPower, "W", 3), 100*st.PulsePower/rt.MaxPower)
		}
		if st.PastKnee > 0 {
			add(PastKnee, st.PastKnee, d.Device.Params.BreakdownVoltage, "the pulse drives the junction past its %s breakdown knee for %s in all",
				si.Format(d.Device.Params.BreakdownVoltage, "V", 3), si.Format(st.PastKnee, "s", 3))
		}
	}
}

// blocks cautions where an AC-coupled port's DC block passed a mean
// current over the run of more than blockShare of its peak: the run held
// the block at its DC-point voltage, as an ideal block would, while a
// real capacitor would have charged and moved the bias.
func (res *PulseResult) blocks(nw *smallsignal.Network, r *Result) {
	n := len(r.Times)
	if n < 2 {
		return
	}
	span := r.Times[n-1] - r.Times[0]
	for k, b := range r.Blocks {
		cur := r.BlockCurrents[k]
		q, peak := 0.0, 0.0
		for i := 1; i < n; i++ {
			q += (r.Times[i] - r.Times[i-1]) * (cur[i] + cur[i-1]) / 2
			peak = math.Max(peak, math.Abs(cur[i]))
		}
		if mean := q / span; peak > 0 && math.Abs(mean) > blockShare*peak {
			res.caution(Caution{Kind: BlockCharging, Part: nw.Ports[b].Name, Value: mean, Limit: blockShare * peak,
				Message: fmt.Sprintf("port %s: its DC block passed a mean current of %s over the run (%s in all, %.0f %% of its peak current); the run holds an ideal block at its DC-point voltage, while a real blocking capacitor of C would charge by %s/C and shift the bias: give the DC path in the circuit, or the block as a capacitor",
					nw.Ports[b].Name, si.Format(mean, "A", 3), si.Format(q, "C", 3), 100*math.Abs(mean)/peak, si.Format(math.Abs(q), "C", 3))})
		}
	}
}
