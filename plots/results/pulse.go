package results

import (
	"encoding/csv"
	"errors"
	"io"
	"math"
	"strconv"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/ac/transient"
	"qpoint/bias/circuit"
)

// Pulse is `pulse --json`: the contract's keys (carrier, level_dbm,
// width, steps, the leakage and recovery figures, rise_time, fall_time,
// diodes, envelope) and more.
type Pulse struct {
	Input    string `json:"input"`
	Output   string `json:"output"`
	Kind     string `json:"kind,omitempty"`
	Carrier  Number `json:"carrier"`
	LevelDBm Number `json:"level_dbm"`
	Width    Number `json:"width"`
	Rise     Number `json:"rise"`
	Fall     Number `json:"fall"`
	Period   Number `json:"period"`
	Pulses   int    `json:"pulses"`
	Start    Number `json:"start"`
	Probe    *Probe `json:"probe"`

	Steps  *Steps       `json:"steps,omitempty"`
	Solver *PulseSolver `json:"solver,omitempty"`

	SpikeLeakageDBm Number  `json:"spike_leakage_dbm"`
	SpikeTime       Number  `json:"spike_time"`
	SpikeEnergy     Number  `json:"spike_energy"`
	FlatLeakageDBm  Number  `json:"flat_leakage_dbm"`
	Recovery1dB     Number  `json:"recovery_time_1db"`
	Recovery3dB     Number  `json:"recovery_time_3db"`
	RecoveryBounds  [2]bool `json:"recovery_upper_bounds"`
	LossBeforeDB    Number  `json:"insertion_loss_before_db"`
	SmallSignalDB   Number  `json:"small_signal_loss_db"`
	RiseTime        Number  `json:"rise_time"`
	FallTime        Number  `json:"fall_time"`
	SettledOutput   Number  `json:"settled_output"`
	SteadyDCShift   Number  `json:"steady_dc_shift"`
	BaselineOutput  Number  `json:"baseline_output"`

	Diodes       []PulseDiode   `json:"diodes"`
	PulseFigures []PulseFigures `json:"pulse_figures,omitempty"`
	Energy       *PulseEnergy   `json:"energy,omitempty"`

	Envelope         [][2]Number `json:"envelope"`
	Video            [][2]Number `json:"video,omitempty"`
	ProbeLossChange  [][2]Number `json:"probe_loss_change,omitempty"`
	Waveform         [][2]Number `json:"waveform,omitempty"`
	WaveformComplete bool        `json:"waveform_complete"`

	Cautions   []PulseCaution `json:"cautions"`
	Stopped    *Stopped       `json:"stopped,omitempty"`
	LevelSweep []PulseLevel   `json:"level_sweep,omitempty"`
}

// Probe is a limiter's probe tone.
type Probe struct {
	Frequency Number `json:"frequency"`
	LevelDBm  Number `json:"level_dbm"`
}

// Steps counts a transient run's accepted and rejected steps.
type Steps struct {
	Accepted int `json:"accepted"`
	Rejected int `json:"rejected"`
}

// PulseSolver is the transient solver's record.
type PulseSolver struct {
	Method           string `json:"method"`
	Damping          string `json:"damping"`
	Tolerance        Number `json:"tolerance"`
	NewtonIterations int    `json:"newton_iterations"`
	NewtonFailures   int    `json:"newton_failures"`
	Fallbacks        int    `json:"fallbacks"`
	SmallestStep     Number `json:"smallest_step"`
	LargestStep      Number `json:"largest_step"`
	Runtime          Number `json:"runtime"`
}

// PulseDiode is one diode's extremes under the pulse.
type PulseDiode struct {
	Name               string `json:"name"`
	PeakCurrent        Number `json:"peak_current"`
	PeakCurrentTime    Number `json:"peak_current_time"`
	PeakReverseVoltage Number `json:"peak_reverse_voltage"`
	PulsePower         Number `json:"pulse_power"`
	PastKnee           Number `json:"past_knee"`
}

// PulseFigures is the figures of one pulse of a train.
type PulseFigures struct {
	Pulse           int    `json:"pulse"`
	Start           Number `json:"start"`
	End             Number `json:"end"`
	SpikeLeakageDBm Number `json:"spike_leakage_dbm"`
	SpikeEnergy     Number `json:"spike_energy"`
	FlatLeakageDBm  Number `json:"flat_leakage_dbm"`
	Recovery1dB     Number `json:"recovery_time_1db"`
	Recovery3dB     Number `json:"recovery_time_3db"`
	SettledOutput   Number `json:"settled_output"`
	RiseTime        Number `json:"rise_time"`
	FallTime        Number `json:"fall_time"`
}

// PulseEnergy is the energy account of a run.
type PulseEnergy struct {
	Source     Number `json:"source"`
	Generator  Number `json:"generator"`
	Delivered  Number `json:"delivered"`
	Dissipated Number `json:"dissipated"`
	Stored     Number `json:"stored"`
	Imbalance  Number `json:"imbalance"`
}

// PulseCaution is one of the pulse run's typed cautions.
type PulseCaution struct {
	Kind    string `json:"kind"`
	Part    string `json:"part,omitempty"`
	Value   Number `json:"value"`
	Limit   Number `json:"limit"`
	Message string `json:"message"`
}

// Stopped says why a run ended early.
type Stopped struct {
	At     Number `json:"at"`
	Want   Number `json:"want"`
	Reason string `json:"reason"`
}

// PulseLevel is one carrier level of a pulse sweep.
type PulseLevel struct {
	LevelDBm        Number         `json:"level_dbm"`
	SpikeLeakageDBm Number         `json:"spike_leakage_dbm"`
	SpikeEnergy     Number         `json:"spike_energy"`
	FlatLeakageDBm  Number         `json:"flat_leakage_dbm"`
	Recovery1dB     Number         `json:"recovery_time_1db"`
	Recovery3dB     Number         `json:"recovery_time_3db"`
	RiseTime        Number         `json:"rise_time"`
	FallTime        Number         `json:"fall_time"`
	SettledOutput   Number         `json:"settled_output"`
	SteadyDCShift   Number         `json:"steady_dc_shift"`
	Steps           *Steps         `json:"steps,omitempty"`
	Diodes          []PulseDiode   `json:"diodes"`
	Cautions        []PulseCaution `json:"cautions"`
	Error           string         `json:"error,omitempty"`
}

// waveformJSONPoints is the most points of the output waveform --json
// gives whole; a longer run gives the edges of each pulse.
const waveformJSONPoints = 100_000

// dbmJSON is a power in dBm, null when there is none.
func dbmJSON(w float64) Number {
	if !(w > 0) {
		return Number(math.NaN())
	}
	return Number(10 * math.Log10(w*1e3))
}

// PulseHead returns what was asked, without results.
func PulseHead(pl *plan.Pulse) *Pulse {
	p := pl.Settings.Pulse
	d := &Pulse{Input: pl.InputName, Output: pl.OutputName, Carrier: Number(p.CarrierHz), LevelDBm: Number(pl.LevelDBm),
		Width: Number(p.Width), Rise: Number(p.Rise), Fall: Number(p.Fall), Period: Number(p.Period), Pulses: max(p.Count, 1),
		Start: Number(p.Start(0)), Cautions: []PulseCaution{}, Diodes: []PulseDiode{}, Envelope: [][2]Number{}}
	return d
}

func diodesJSONOf(ds []transient.DiodeStress) []PulseDiode {
	out := []PulseDiode{}
	for _, d := range ds {
		out = append(out, PulseDiode{d.Name, Number(d.PeakCurrent), Number(d.PeakCurrentTime), Number(d.PeakReverseVoltage), Number(d.PulsePower), Number(d.PastKnee)})
	}
	return out
}

func cautionsJSONOf(cs []transient.Caution) []PulseCaution {
	out := []PulseCaution{}
	for _, c := range cs {
		out = append(out, PulseCaution{c.Kind.String(), c.Part, Number(c.Value), Number(c.Limit), c.Message})
	}
	return out
}

// PulseOf returns the document of one run; runErr is a *Stopped
// error of a run that ended early, or nil.
func PulseOf(c *circuit.Circuit, pl *plan.Pulse, res *transient.PulseResult, runErr error) *Pulse {
	d := PulseHead(pl)
	d.Kind = res.Kind.String()
	p := res.Settings.Pulse
	d.Start = Number(p.Start(0))
	if p.ProbeEMF != 0 {
		d.Probe = &Probe{Number(p.ProbeHz), Number(ac.EMFToDBm(p.ProbeEMF, c.Ports[pl.Settings.Input].Impedance))}
	}
	r := res.Run
	st := r.Stats
	d.Steps = &Steps{st.Accepted, st.Rejected}
	d.Solver = &PulseSolver{Method: st.Method, Damping: st.Damping, Tolerance: Number(res.Settings.Transient.RelativeTolerance),
		NewtonIterations: st.NewtonIterations, NewtonFailures: st.NewtonFailures, Fallbacks: st.Fallbacks,
		SmallestStep: Number(st.SmallestStep), LargestStep: Number(st.LargestStep), Runtime: Number(st.Runtime.Seconds())}
	e := r.Energy
	d.Energy = &PulseEnergy{Number(e.Source), Number(e.Generator), Number(e.Delivered), Number(e.Dissipated), Number(e.Stored), Number(e.Imbalance)}
	f := res.Figures
	nan := Number(math.NaN())
	d.SpikeLeakageDBm, d.SpikeTime, d.SpikeEnergy, d.FlatLeakageDBm = nan, nan, nan, nan
	d.Recovery1dB, d.Recovery3dB, d.RiseTime, d.FallTime, d.SettledOutput = nan, nan, nan, nan, nan
	d.LossBeforeDB, d.SmallSignalDB = Number(res.LossBefore), Number(res.SmallSignalLoss)
	d.SteadyDCShift, d.BaselineOutput = Number(res.SteadyShift), Number(res.Baseline)
	if len(res.Pulses) > 0 {
		d.SpikeLeakageDBm, d.SpikeTime, d.SpikeEnergy, d.FlatLeakageDBm = dbmJSON(f.SpikePeak), Number(f.SpikeTime-f.Start), Number(f.SpikeEnergy), dbmJSON(f.Flat)
		d.Recovery1dB, d.Recovery3dB = Number(f.Recovery1dB), Number(f.Recovery3dB)
		d.RecoveryBounds = [2]bool{f.Recovery1dBBound, f.Recovery3dBBound}
		d.RiseTime, d.FallTime, d.SettledOutput = Number(f.RiseTime), Number(f.FallTime), Number(f.Settled)
	}
	for _, q := range res.Pulses {
		d.PulseFigures = append(d.PulseFigures, PulseFigures{q.Pulse + 1, Number(q.Start), Number(q.End), dbmJSON(q.SpikePeak), Number(q.SpikeEnergy),
			dbmJSON(q.Flat), Number(q.Recovery1dB), Number(q.Recovery3dB), Number(q.Settled), Number(q.RiseTime), Number(q.FallTime)})
	}
	d.Diodes = diodesJSONOf(res.Diodes)
	d.Cautions = cautionsJSONOf(res.Cautions)
	for i, t := range res.EnvelopeTimes {
		d.Envelope = append(d.Envelope, [2]Number{Number(t), Number(res.Envelope[i])})
		if res.Kind == transient.Detector {
			d.Video = append(d.Video, [2]Number{Number(t), Number(res.Video[i])})
		}
		if c := res.LossChange[i]; !math.IsNaN(c) {
			d.ProbeLossChange = append(d.ProbeLossChange, [2]Number{Number(t), Number(c)})
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
			d.Waveform = append(d.Waveform, [2]Number{Number(t), Number(res.Output[i])})
		}
	}
	var stopped *transient.Stopped
	if errors.As(runErr, &stopped) {
		d.Stopped = &Stopped{Number(stopped.At), Number(stopped.Want), stopped.Reason.Error()}
	}
	return d
}

// PulseLevelOf returns one level of a sweep.
func PulseLevelOf(pt transient.LevelPoint) PulseLevel {
	nan := Number(math.NaN())
	l := PulseLevel{LevelDBm: Number(pt.LevelDBm), SpikeLeakageDBm: nan, SpikeEnergy: nan, FlatLeakageDBm: nan, Recovery1dB: nan, Recovery3dB: nan,
		RiseTime: nan, FallTime: nan, SettledOutput: nan, SteadyDCShift: nan, Diodes: []PulseDiode{}, Cautions: []PulseCaution{}}
	if pt.Err != nil {
		l.Error = pt.Err.Error()
	}
	r := pt.Result
	if r == nil {
		return l
	}
	f := r.Figures
	if len(r.Pulses) > 0 {
		l.SpikeLeakageDBm, l.SpikeEnergy, l.FlatLeakageDBm = dbmJSON(f.SpikePeak), Number(f.SpikeEnergy), dbmJSON(f.Flat)
		l.Recovery1dB, l.Recovery3dB = Number(f.Recovery1dB), Number(f.Recovery3dB)
		l.RiseTime, l.FallTime, l.SettledOutput = Number(f.RiseTime), Number(f.FallTime), Number(f.Settled)
	}
	l.SteadyDCShift = Number(r.SteadyShift)
	if r.Run != nil {
		l.Steps = &Steps{r.Run.Stats.Accepted, r.Run.Stats.Rejected}
	}
	l.Diodes = diodesJSONOf(r.Diodes)
	l.Cautions = cautionsJSONOf(r.Cautions)
	return l
}

// WritePulseCSV writes every point of the run: time, the generator's EMF,
// the output, and each diode's junction current and voltage.
func WritePulseCSV(w io.Writer, pl *plan.Pulse, res *transient.PulseResult) error {
	cw := csv.NewWriter(w)
	header := []string{"time_s", "emf_V", "output_" + pl.OutputName + "_V"}
	for _, d := range res.Run.Diodes {
		header = append(header, d.Name+"_current_A", d.Name+"_junction_V")
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	row := make([]string, 0, len(header))
	for i, t := range res.Run.Times {
		row = append(row[:0], g(t), g(res.Run.EMF[i]), g(res.Output[i]))
		for _, d := range res.Run.Diodes {
			row = append(row, g(d.Current[i]), g(d.Junction[i]))
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// PulseSweepOf is the JSON document of a pulse run repeated over carrier
// levels: the plan and a row per level.
func PulseSweepOf(pl *plan.Pulse, pts []transient.LevelPoint) *Pulse {
	doc := PulseHead(pl)
	for _, p := range pts {
		doc.LevelSweep = append(doc.LevelSweep, PulseLevelOf(p))
	}
	return doc
}
