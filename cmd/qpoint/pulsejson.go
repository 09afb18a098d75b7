package main

import (
	"errors"
	"math"

	"qpoint/ac"
	"qpoint/ac/transient"
)

// pulseJSON is `pulse --json`: the contract's keys (carrier, level_dbm,
// width, steps, the leakage and recovery figures, rise_time, fall_time,
// diodes, envelope) and more.
type pulseJSON struct {
	Input    string     `json:"input"`
	Output   string     `json:"output"`
	Kind     string     `json:"kind,omitempty"`
	Carrier  number     `json:"carrier"`
	LevelDBm number     `json:"level_dbm"`
	Width    number     `json:"width"`
	Rise     number     `json:"rise"`
	Fall     number     `json:"fall"`
	Period   number     `json:"period"`
	Pulses   int        `json:"pulses"`
	Start    number     `json:"start"`
	Probe    *probeJSON `json:"probe"`

	Steps  *stepsJSON       `json:"steps,omitempty"`
	Solver *pulseSolverJSON `json:"solver,omitempty"`

	SpikeLeakageDBm number  `json:"spike_leakage_dbm"`
	SpikeTime       number  `json:"spike_time"`
	SpikeEnergy     number  `json:"spike_energy"`
	FlatLeakageDBm  number  `json:"flat_leakage_dbm"`
	Recovery1dB     number  `json:"recovery_time_1db"`
	Recovery3dB     number  `json:"recovery_time_3db"`
	RecoveryBounds  [2]bool `json:"recovery_upper_bounds"`
	LossBeforeDB    number  `json:"insertion_loss_before_db"`
	SmallSignalDB   number  `json:"small_signal_loss_db"`
	RiseTime        number  `json:"rise_time"`
	FallTime        number  `json:"fall_time"`
	SettledOutput   number  `json:"settled_output"`
	SteadyDCShift   number  `json:"steady_dc_shift"`
	BaselineOutput  number  `json:"baseline_output"`

	Diodes       []pulseDiodeJSON   `json:"diodes"`
	PulseFigures []pulseFiguresJSON `json:"pulse_figures,omitempty"`
	Energy       *pulseEnergyJSON   `json:"energy,omitempty"`

	Envelope         [][2]number `json:"envelope"`
	Video            [][2]number `json:"video,omitempty"`
	ProbeLossChange  [][2]number `json:"probe_loss_change,omitempty"`
	Waveform         [][2]number `json:"waveform,omitempty"`
	WaveformComplete bool        `json:"waveform_complete"`

	Cautions   []pulseCautionJSON `json:"cautions"`
	Stopped    *stoppedJSON       `json:"stopped,omitempty"`
	LevelSweep []pulseLevelJSON   `json:"level_sweep,omitempty"`
}

type probeJSON struct {
	Frequency number `json:"frequency"`
	LevelDBm  number `json:"level_dbm"`
}

type stepsJSON struct {
	Accepted int `json:"accepted"`
	Rejected int `json:"rejected"`
}

type pulseSolverJSON struct {
	Method           string `json:"method"`
	Damping          string `json:"damping"`
	Tolerance        number `json:"tolerance"`
	NewtonIterations int    `json:"newton_iterations"`
	NewtonFailures   int    `json:"newton_failures"`
	Fallbacks        int    `json:"fallbacks"`
	SmallestStep     number `json:"smallest_step"`
	LargestStep      number `json:"largest_step"`
	Runtime          number `json:"runtime"`
}

type pulseDiodeJSON struct {
	Name               string `json:"name"`
	PeakCurrent        number `json:"peak_current"`
	PeakCurrentTime    number `json:"peak_current_time"`
	PeakReverseVoltage number `json:"peak_reverse_voltage"`
	PulsePower         number `json:"pulse_power"`
	PastKnee           number `json:"past_knee"`
}

type pulseFiguresJSON struct {
	Pulse           int    `json:"pulse"`
	Start           number `json:"start"`
	End             number `json:"end"`
	SpikeLeakageDBm number `json:"spike_leakage_dbm"`
	SpikeEnergy     number `json:"spike_energy"`
	FlatLeakageDBm  number `json:"flat_leakage_dbm"`
	Recovery1dB     number `json:"recovery_time_1db"`
	Recovery3dB     number `json:"recovery_time_3db"`
	SettledOutput   number `json:"settled_output"`
	RiseTime        number `json:"rise_time"`
	FallTime        number `json:"fall_time"`
}

type pulseEnergyJSON struct {
	Source     number `json:"source"`
	Generator  number `json:"generator"`
	Delivered  number `json:"delivered"`
	Dissipated number `json:"dissipated"`
	Stored     number `json:"stored"`
	Imbalance  number `json:"imbalance"`
}

type pulseCautionJSON struct {
	Kind    string `json:"kind"`
	Part    string `json:"part,omitempty"`
	Value   number `json:"value"`
	Limit   number `json:"limit"`
	Message string `json:"message"`
}

type stoppedJSON struct {
	At     number `json:"at"`
	Want   number `json:"want"`
	Reason string `json:"reason"`
}

type pulseLevelJSON struct {
	LevelDBm        number             `json:"level_dbm"`
	SpikeLeakageDBm number             `json:"spike_leakage_dbm"`
	SpikeEnergy     number             `json:"spike_energy"`
	FlatLeakageDBm  number             `json:"flat_leakage_dbm"`
	Recovery1dB     number             `json:"recovery_time_1db"`
	Recovery3dB     number             `json:"recovery_time_3db"`
	RiseTime        number             `json:"rise_time"`
	FallTime        number             `json:"fall_time"`
	SettledOutput   number             `json:"settled_output"`
	SteadyDCShift   number             `json:"steady_dc_shift"`
	Steps           *stepsJSON         `json:"steps,omitempty"`
	Diodes          []pulseDiodeJSON   `json:"diodes"`
	Cautions        []pulseCautionJSON `json:"cautions"`
	Error           string             `json:"error,omitempty"`
}

// waveformJSONPoints is the most points of the output waveform --json
// gives whole; a longer run gives the edges of each pulse.
const waveformJSONPoints = 100_000

// dbmJSON is a power in dBm, null when there is none.
func dbmJSON(w float64) number {
	if !(w > 0) {
		return number(math.NaN())
	}
	return number(10 * math.Log10(w*1e3))
}

// pulseJSONHeader returns what was asked, without results.
func pulseJSONHeader(s *pulseSetup) *pulseJSON {
	p := s.settings.Pulse
	d := &pulseJSON{Input: s.inName, Output: s.outName, Carrier: number(p.CarrierHz), LevelDBm: number(s.levelDBm),
		Width: number(p.Width), Rise: number(p.Rise), Fall: number(p.Fall), Period: number(p.Period), Pulses: max(p.Count, 1),
		Start: number(p.Start(0)), Cautions: []pulseCautionJSON{}, Diodes: []pulseDiodeJSON{}, Envelope: [][2]number{}}
	return d
}

func diodesJSONOf(ds []transient.DiodeStress) []pulseDiodeJSON {
	out := []pulseDiodeJSON{}
	for _, d := range ds {
		out = append(out, pulseDiodeJSON{d.Name, number(d.PeakCurrent), number(d.PeakCurrentTime), number(d.PeakReverseVoltage), number(d.PulsePower), number(d.PastKnee)})
	}
	return out
}

func cautionsJSONOf(cs []transient.Caution) []pulseCautionJSON {
	out := []pulseCautionJSON{}
	for _, c := range cs {
		out = append(out, pulseCautionJSON{c.Kind.String(), c.Part, number(c.Value), number(c.Limit), c.Message})
	}
	return out
}

// pulseJSONOf returns the document of one run; runErr is a *Stopped
// error of a run that ended early, or nil.
func pulseJSONOf(s *pulseSetup, res *transient.PulseResult, runErr error) *pulseJSON {
	d := pulseJSONHeader(s)
	d.Kind = res.Kind.String()
	p := res.Settings.Pulse
	d.Start = number(p.Start(0))
	if p.ProbeEMF != 0 {
		d.Probe = &probeJSON{number(p.ProbeHz), number(ac.EMFToDBm(p.ProbeEMF, s.c.Ports[s.settings.Input].Impedance))}
	}
	r := res.Run
	st := r.Stats
	d.Steps = &stepsJSON{st.Accepted, st.Rejected}
	d.Solver = &pulseSolverJSON{Method: st.Method, Damping: st.Damping, Tolerance: number(res.Settings.Transient.RelativeTolerance),
		NewtonIterations: st.NewtonIterations, NewtonFailures: st.NewtonFailures, Fallbacks: st.Fallbacks,
		SmallestStep: number(st.SmallestStep), LargestStep: number(st.LargestStep), Runtime: number(st.Runtime.Seconds())}
	e := r.Energy
	d.Energy = &pulseEnergyJSON{number(e.Source), number(e.Generator), number(e.Delivered), number(e.Dissipated), number(e.Stored), number(e.Imbalance)}
	f := res.Figures
	nan := number(math.NaN())
	d.SpikeLeakageDBm, d.SpikeTime, d.SpikeEnergy, d.FlatLeakageDBm = nan, nan, nan, nan
	d.Recovery1dB, d.Recovery3dB, d.RiseTime, d.FallTime, d.SettledOutput = nan, nan, nan, nan, nan
	d.LossBeforeDB, d.SmallSignalDB = number(res.LossBefore), number(res.SmallSignalLoss)
	d.SteadyDCShift, d.BaselineOutput = number(res.SteadyShift), number(res.Baseline)
	if len(res.Pulses) > 0 {
		d.SpikeLeakageDBm, d.SpikeTime, d.SpikeEnergy, d.FlatLeakageDBm = dbmJSON(f.SpikePeak), number(f.SpikeTime-f.Start), number(f.SpikeEnergy), dbmJSON(f.Flat)
		d.Recovery1dB, d.Recovery3dB = number(f.Recovery1dB), number(f.Recovery3dB)
		d.RecoveryBounds = [2]bool{f.Recovery1dBBound, f.Recovery3dBBound}
		d.RiseTime, d.FallTime, d.SettledOutput = number(f.RiseTime), number(f.FallTime), number(f.Settled)
	}
	for _, q := range res.Pulses {
		d.PulseFigures = append(d.PulseFigures, pulseFiguresJSON{q.Pulse + 1, number(q.Start), number(q.End), dbmJSON(q.SpikePeak), number(q.SpikeEnergy),
			dbmJSON(q.Flat), number(q.Recovery1dB), number(q.Recovery3dB), number(q.Settled), number(q.RiseTime), number(q.FallTime)})
	}
	d.Diodes = diodesJSONOf(res.Diodes)
	d.Cautions = cautionsJSONOf(res.Cautions)
	for i, t := range res.EnvelopeTimes {
		d.Envelope = append(d.Envelope, [2]number{number(t), number(res.Envelope[i])})
		if res.Kind == transient.Detector {
			d.Video = append(d.Video, [2]number{number(t), number(res.Video[i])})
		}
		if c := res.LossChange[i]; !math.IsNaN(c) {
			d.ProbeLossChange = append(d.ProbeLossChange, [2]number{number(t), number(c)})
		}
	}
	// The waveform: whole, or each pulse's edges.
	keep := func(float64) bool { return true }
	d.WaveformComplete = len(r.Times) <= waveformJSONPoints
	if !d.WaveformComplete {
		tc := 1 / p.CarrierHz
		var spans [][2]float64
		for k := 0; k < max(p.Count, 1); k++ {
			c := p.Corners(k)
			spans = append(spans, [2]float64{c[0] - 5*tc, c[1] + 20*tc}, [2]float64{c[2] - 5*tc, c[3] + 20*tc})
		}
		keep = func(t float64) bool {
			for _, sp := range spans {
				if t >= sp[0] && t <= sp[1] {
					return true
				}
			}
			return false
		}
	}
	for i, t := range r.Times {
		if keep(t) {
			d.Waveform = append(d.Waveform, [2]number{number(t), number(res.Output[i])})
		}
	}
	var stopped *transient.Stopped
	if errors.As(runErr, &stopped) {
		d.Stopped = &stoppedJSON{number(stopped.At), number(stopped.Want), stopped.Reason.Error()}
	}
	return d
}

// pulseLevelJSONOf returns one level of a sweep.
func pulseLevelJSONOf(pt transient.LevelPoint) pulseLevelJSON {
	nan := number(math.NaN())
	l := pulseLevelJSON{LevelDBm: number(pt.LevelDBm), SpikeLeakageDBm: nan, SpikeEnergy: nan, FlatLeakageDBm: nan, Recovery1dB: nan, Recovery3dB: nan,
		RiseTime: nan, FallTime: nan, SettledOutput: nan, SteadyDCShift: nan, Diodes: []pulseDiodeJSON{}, Cautions: []pulseCautionJSON{}}
	if pt.Err != nil {
		l.Error = pt.Err.Error()
	}
	r := pt.Result
	if r == nil {
		return l
	}
	f := r.Figures
	if len(r.Pulses) > 0 {
		l.SpikeLeakageDBm, l.SpikeEnergy, l.FlatLeakageDBm = dbmJSON(f.SpikePeak), number(f.SpikeEnergy), dbmJSON(f.Flat)
		l.Recovery1dB, l.Recovery3dB = number(f.Recovery1dB), number(f.Recovery3dB)
		l.RiseTime, l.FallTime, l.SettledOutput = number(f.RiseTime), number(f.FallTime), number(f.Settled)
	}
	l.SteadyDCShift = number(r.SteadyShift)
	if r.Run != nil {
		l.Steps = &stepsJSON{r.Run.Stats.Accepted, r.Run.Stats.Rejected}
	}
	l.Diodes = diodesJSONOf(r.Diodes)
	l.Cautions = cautionsJSONOf(r.Cautions)
	return l
}
