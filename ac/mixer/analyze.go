package mixer

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"
	"time"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/ac/steady"
	"qpoint/bias/diode"
	"qpoint/smallsignal"
)

// BreakdownError refuses a pump that drives a junction past its breakdown
// knee: the conversion about it would describe a part in breakdown. The
// Result returned beside it holds the pump for inspection.
type BreakdownError struct {
	Diode              string
	Fraction           float64 // of the period past the knee
	PeakReverseVoltage float64
	KneeVoltage        float64
}

func (e *BreakdownError) Error() string {
	return fmt.Sprintf("the LO drive takes %s past its breakdown knee (%s reverse at the peak, the knee at %s) for %.1f %% of the period; lower the LO level or change the bias",
		e.Diode, volts(e.PeakReverseVoltage), volts(e.KneeVoltage), 100*e.Fraction)
}

func volts(v float64) string { return fmt.Sprintf("%.3g V", v) }

// Analyze solves the pump and the conversion about it (see the package
// comment). A request it cannot honour is a *SettingError; a pump past a
// breakdown knee a *BreakdownError, returned with the Result.
func Analyze(nw *smallsignal.Network, s Settings) (*Result, error) {
	begin := time.Now()
	s = s.withDefaults()
	if err := Check(nw, s); err != nil {
		return nil, err
	}
	hs := s.Balance
	hs.Start = nil
	if s.Start != nil && s.Start.Pump != nil && s.Start.Settings.LO == s.LO && s.Start.Settings.LOFrequencyHz == s.LOFrequencyHz {
		hs.Start = s.Start.Pump
	}
	drive := ac.Drive{Input: s.LO, Output: ac.Output{Port: s.IF}, FrequencyHz: s.LOFrequencyHz, EMF: s.LOEMF}
	pump, err := balance.Solve(nw, drive, hs)
	if err != nil {
		return nil, fmt.Errorf("the LO-driven steady state: %w", err)
	}
	res := &Result{Settings: s, IFHz: s.IFHz(), RFSideband: 1, Pump: pump}
	if s.RFFrequencyHz < s.LOFrequencyHz {
		res.RFSideband = -1
	}
	res.Stats.Pump = pump.Stats
	res.Stats.Shooting = math.NaN()
	harm := pumpHarmonics(pump)
	waves, samples := junctionWaves(nw, harm, 2*s.MaxSidebands)
	res.Stats.Samples = samples
	lo := loFiguresOf(nw, s, harm, waves)
	res.LO = LO{FrequencyHz: s.LOFrequencyHz, AvailableW: lo.availableW, AbsorbedW: lo.absorbedW,
		InputImpedance: lo.inputImpedance, LeakageToRFW: lo.leakRFW, LeakageToIFW: lo.leakIFW}
	res.diodes(nw, waves)

	if err := res.convert(nw, waves); err != nil {
		return nil, err
	}
	if s.CheckShooting {
		res.shootingCheck(nw, drive)
	}
	res.cautions(nw)
	res.Stats.Runtime = time.Since(begin)
	for _, d := range res.Diodes {
		if d.BreakdownFraction > 0 && !s.AllowBreakdown {
			knee := 0.0
			for _, dd := range nw.Diodes {
				if dd.Name == d.Name {
					knee = dd.Device.Params.BreakdownVoltage
				}
			}
			return res, &BreakdownError{Diode: d.Name, Fraction: d.BreakdownFraction, PeakReverseVoltage: d.PeakReverseVoltage, KneeVoltage: knee}
		}
	}
	return res, nil
}

// diodes fills each diode's figures under the pump.
func (r *Result) diodes(nw *smallsignal.Network, waves []pumped) {
	for d, st := range r.Pump.Stress {
		r.Diodes = append(r.Diodes, Diode{Name: st.Name, DCCurrent: real(waves[d].I(0)), PeakCurrent: st.PeakCurrent,
			PeakReverseVoltage: st.PeakReverseVoltage, MeanPower: st.MeanPower, BreakdownFraction: st.BreakdownFraction})
	}
}

// figures are what one conversion gives.
type figures struct {
	loss, image, up             float64
	zRF, zImage, zIF            complex128
	nfSSB, nfDSB, outputDensity float64
	contributions               []Contribution
}

// settleDB is how little, in dB, the losses and noise figures may move
// when the sidebands double for the count to stop growing, and
// settleRel how little, relative, the port impedances may.
const (
	settleDB  = 1e-3
	settleRel = 1e-4
)

// change returns the largest change between two sets of figures: of the
// losses and noise figures in dB, of the impedances relative to
// themselves.
func change(a, b figures) (db, rel float64) {
	for _, pair := range [][2]float64{{a.loss, b.loss}, {a.image, b.image}, {a.up, b.up}, {a.nfSSB, b.nfSSB}, {a.nfDSB, b.nfDSB}} {
		if x := math.Abs(pair[0] - pair[1]); !math.IsNaN(x) {
			db = math.Max(db, x)
		}
	}
	for _, pair := range [][2]complex128{{a.zRF, b.zRF}, {a.zImage, b.zImage}, {a.zIF, b.zIF}} {
		if x := cmplx.Abs(pair[0]-pair[1]) / cmplx.Abs(pair[1]); !math.IsNaN(x) {
			rel = math.Max(rel, x)
		}
	}
	return db, rel
}

// convert runs the conversion at K = Sidebands and doubles K until the
// figures settle.
func (r *Result) convert(nw *smallsignal.Network, waves []pumped) error {
	s := r.Settings
	K := s.Sidebands
	var prev *figures
	for {
		f, err := r.figuresAt(nw, waves, K)
		if err != nil {
			return err
		}
		r.apply(f)
		r.Stats.Sidebands = K
		if s.FixedSidebands {
			return nil
		}
		if prev != nil {
			r.Stats.SidebandChange, r.Stats.SidebandImpedanceChange = change(*prev, f)
			if r.Stats.SidebandChange <= settleDB && r.Stats.SidebandImpedanceChange <= settleRel {
				return nil
			}
		}
		if 2*K > s.MaxSidebands {
			if prev == nil {
				r.Stats.SidebandChange, r.Stats.SidebandImpedanceChange = math.Inf(1), math.Inf(1)
			}
			return nil
		}
		prev = &f
		K *= 2
	}
}

func (r *Result) apply(f figures) {
	r.ConversionLossDB, r.ImageConversionLossDB, r.UpconversionLossDB = f.loss, f.image, f.up
	r.RFInputImpedance, r.ImageInputImpedance, r.IFOutputImpedance = f.zRF, f.zImage, f.zIF
	r.Noise = Noise{FigureSSBDB: f.nfSSB, FigureDSBDB: f.nfDSB, OutputDensity: f.outputDensity, Contributions: f.contributions}
}

// figuresAt computes every figure with K sidebands each side.
func (r *Result) figuresAt(nw *smallsignal.Network, waves []pumped, K int) (figures, error) {
	s := r.Settings
	cv, err := newConversion(nw, s, waves, K)
	if err != nil {
		return figures{}, err
	}
	var f figures
	rf, iff := nw.Ports[s.RF], nw.Ports[s.IF]
	sIF, sRF, sImage := K, K+r.RFSideband, K-r.RFSideband
	physical := func(sb int, z complex128) complex128 {
		if cv.omega[sb] < 0 {
			return cmplx.Conj(z)
		}
		return z
	}
	impedance := func(port, sb int, sol solution) complex128 {
		v := portVoltage(nw, port, sol.x[sb])
		i := portCurrent(nw, port, cv.omega[sb], sol.x[sb], sol.i[sb])
		return physical(sb, v/i)
	}
	db := func(x float64) float64 { return 10 * math.Log10(x) }

	// Down-conversion from the RF and from the image: a 1 V EMF behind
	// the RF port's reference.
	for _, c := range []struct {
		sb   int
		loss *float64
		z    *complex128
	}{{sRF, &f.loss, &f.zRF}, {sImage, &f.image, &f.zImage}} {
		sol := cv.excite(s.RF, c.sb-K, complex(1/rf.Impedance, 0))
		vIF := portVoltage(nw, s.IF, sol.x[sIF])
		// Available 1/(8 R_RF) over delivered |V_IF|²/(2 R_IF).
		*c.loss = db(iff.Impedance / (4 * rf.Impedance * sq(vIF)))
		*c.z = impedance(s.RF, c.sb, sol)
	}
	// Up-conversion and the IF output impedance: a 1 V EMF behind the IF
	// port's reference at the IF.
	sol := cv.excite(s.IF, 0, complex(1/iff.Impedance, 0))
	vRF := portVoltage(nw, s.RF, sol.x[sRF])
	f.up = db(rf.Impedance / (4 * iff.Impedance * sq(vRF)))
	f.zIF = impedance(s.IF, sIF, sol)

	r.noise(nw, cv, &f, sRF, sImage)
	return f, nil
}

func sq(z complex128) float64 { return real(z)*real(z) + imag(z)*imag(z) }

// noise fills the noise at the IF port and the noise figures.
func (r *Result) noise(nw *smallsignal.Network, cv *conversion, f *figures, sRF, sImage int) {
	s := r.Settings
	tr := cv.ifTransfers()
	S := len(tr)
	sIF := cv.K
	transfer := func(sb, a, b int) complex128 { return at(tr[sb], a) - at(tr[sb], b) }
	var total float64
	var list []Contribution
	var signal, image float64
	t0 := float64(ac.StandardNoiseTemperatureK)
	for _, src := range ac.NoiseSources(nw) {
		if src.Where == ac.InJunction {
			continue // below, cyclostationary
		}
		a, b := src.Nodes()
		white := src.White
		if src.Port == s.RF {
			// The noise figure's source is at T0 whatever the port's own
			// noise temperature.
			white = 4 * diode.Boltzmann * t0 / nw.Ports[s.RF].Impedance
		}
		var d float64
		for sb := 0; sb < S; sb++ {
			if src.Port == s.IF && sb == sIF {
				continue // the next stage's own noise
			}
			if src.Correlated() {
				// A line or block, by Twiss's theorem at each sideband:
				// thermal, so uncorrelated between sidebands.
				d += src.OutputAt(cv.omega[sb]/(2*math.Pi), tr[sb])
				continue
			}
			d += white * sq(transfer(sb, a, b))
		}
		if src.Port == s.RF {
			signal = white * sq(transfer(sRF, a, b))
			image = white * sq(transfer(sImage, a, b))
		}
		total += d
		list = append(list, Contribution{Source: src.Label(), Density: d})
	}
	for j, dd := range nw.Diodes {
		w := cv.waves[j]
		t := make([]complex128, S)
		for sb := range t {
			t[sb] = transfer(sb, dd.Junction, dd.Cathode)
		}
		// Σ_kl t_k S_(k-l) conj(t_l), a Hermitian form of the shot
		// noise's sideband correlation (Dragone 1968).
		var d float64
		for k := 0; k < S; k++ {
			var row complex128
			for l := 0; l < S; l++ {
				row += w.S(k-l) * cmplx.Conj(t[l])
			}
			d += real(t[k] * row)
		}
		total += d
		list = append(list, Contribution{Source: dd.Name + " junction (shot, pumped)", Density: d})
	}
	sort.SliceStable(list, func(i, j int) bool { return list[i].Density > list[j].Density })
	for i := range list {
		list[i].Share = list[i].Density / total
	}
	f.outputDensity, f.contributions = total, list
	f.nfSSB = 10 * math.Log10(total/signal)
	f.nfDSB = 10 * math.Log10(total/(signal+image))
}

// shootingCheck solves the pump by shooting and compares the junction
// currents at DC and the first five harmonics. It shoots at 255 samples
// a period first (with the 511-sample solve the extrapolation takes, the
// two methods agree to 5e-9..2e-8 over the demo's LO sweep, far inside
// shootingTolerance) and again at 1023 only when that first answer fails
// or lies within a tenth of the tolerance, so that a difference it
// reports is the balance's and not the shooting's own step.
func (r *Result) shootingCheck(nw *smallsignal.Network, drive ac.Drive) {
	h := min(5, r.Pump.Stats.Harmonics)
	hb := r.Pump.Steady()
	for _, samples := range []int{255, 1023} {
		st, err := steady.Solve(nw, drive, steady.Settings{Harmonics: h, Samples: samples})
		if err != nil {
			r.Stats.Shooting, r.Stats.ShootingError = math.NaN(), err.Error()
			continue
		}
		r.Stats.ShootingError = ""
		worst := 0.0
		for d := range st.DiodeCurrents {
			scale := 0.0
			for _, x := range hb.DiodeCurrents[d] {
				scale = math.Max(scale, cmplx.Abs(x.Phasor))
			}
			for k, x := range st.DiodeCurrents[d] {
				if k >= len(hb.DiodeCurrents[d]) || k > h {
					break
				}
				worst = math.Max(worst, cmplx.Abs(x.Phasor-hb.DiodeCurrents[d][k].Phasor)/scale)
			}
		}
		r.Stats.Shooting = worst
		if worst <= shootingTolerance/10 {
			return
		}
	}
}

// shootingTolerance is the relative difference between the two methods'
// junction currents above which a caution says so.
const shootingTolerance = 1e-3

// cautions gathers the typed cautions.
func (r *Result) cautions(nw *smallsignal.Network) {
	for _, c := range r.Pump.Steady().StressCautions() {
		c := c
		r.Cautions = append(r.Cautions, Caution{Kind: StressCaution, Part: c.Diode, Value: c.Value, Limit: c.Limit, Message: c.Message, Stress: &c})
	}
	for _, d := range r.Diodes {
		if d.BreakdownFraction > 0 {
			r.Cautions = append(r.Cautions, Caution{Kind: BreakdownCaution, Part: d.Name, Value: d.BreakdownFraction,
				Message: fmt.Sprintf("%s: the LO drive takes the junction past its breakdown knee for %.1f %% of the period", d.Name, 100*d.BreakdownFraction)})
		}
	}
	if st := r.Stats; !r.Settings.FixedSidebands && st.SidebandChange > settleDB {
		r.Cautions = append(r.Cautions, Caution{Kind: SidebandsUnsettled, Value: st.SidebandChange, Limit: settleDB,
			Message: fmt.Sprintf("the losses and noise figures still moved by %.3g dB when the sidebands doubled to %d each side (a hard-switched junction needs many); they hold to about that", st.SidebandChange, st.Sidebands)})
	}
	if st := r.Stats; !r.Settings.FixedSidebands && st.SidebandImpedanceChange > settleRel {
		r.Cautions = append(r.Cautions, Caution{Kind: SidebandsUnsettled, Value: st.SidebandImpedanceChange, Limit: settleRel,
			Message: fmt.Sprintf("the port impedances still moved by %.2g %% when the sidebands doubled to %d each side (a hard-switched junction needs many); they hold to about that", 100*st.SidebandImpedanceChange, st.Sidebands)})
	}
	if u := r.Pump.Stats.Unsettled; u > 0 {
		r.Cautions = append(r.Cautions, Caution{Kind: HarmonicsUnsettled, Value: u,
			Message: fmt.Sprintf("the pump stopped at its harmonic limit (%d) with its reported values still moving by %.2g relative; the figures hold to about that", r.Pump.Stats.Harmonics, u)})
	}
	var flicker []string
	for _, d := range nw.Diodes {
		if d.Device.Params.FlickerCoefficient > 0 {
			flicker = append(flicker, d.Name)
		}
	}
	if len(flicker) > 0 {
		r.Cautions = append(r.Cautions, Caution{Kind: FlickerLeftOut, Part: strings.Join(flicker, ", "),
			Message: fmt.Sprintf("the flicker noise of %s is left out of the mixer's noise: a pumped junction's flicker noise is not modelled; at a low IF it can dominate", strings.Join(flicker, ", "))})
	}
	if x := r.Stats.Shooting; x > shootingTolerance {
		r.Cautions = append(r.Cautions, Caution{Kind: ShootingDisagrees, Value: x, Limit: shootingTolerance,
			Message: fmt.Sprintf("shooting and harmonic balance differ by %.2g of the junction currents: the pump is uncertain to about that", x)})
	}
	if r.Stats.ShootingError != "" {
		r.Cautions = append(r.Cautions, Caution{Kind: ShootingDisagrees, Value: math.NaN(),
			Message: "the shooting check did not converge (" + r.Stats.ShootingError + "); harmonic balance stands unchecked"})
	}
	if r.ConversionLossDB < 0 {
		r.Cautions = append(r.Cautions, Caution{Kind: ConversionGainFound, Value: r.ConversionLossDB,
			Message: fmt.Sprintf("the conversion has %.2f dB of gain: pumped junction capacitance can amplify (a parametric effect), which may also make the mixer unstable", -r.ConversionLossDB)})
	}
}
