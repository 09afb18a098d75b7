package results

import (
	"math"

	"qpoint/ac/mixer"
	"qpoint/ac/plan"
	"qpoint/bias"
	"qpoint/plots/report"
)

// Mixer is the document of `mixer --json`, in the shape
// circuit-file.md fixes (lo, rf, if, conversion_loss_db,
// image_conversion_loss_db, noise_figure_ssb_db, noise_figure_dsb_db,
// diodes, method), with more keys beside.
type Mixer struct {
	Circuit     string `json:"circuit"`
	File        string `json:"file"`
	Temperature Number `json:"temperature"`
	LO          struct {
		Port           string  `json:"port"`
		Frequency      Number  `json:"frequency"`
		LevelDBm       Number  `json:"level_dbm"`
		AvailablePower Number  `json:"available_power"`
		AbsorbedPower  Number  `json:"absorbed_power"`
		InputImpedance Complex `json:"input_impedance"`
		LeakageToRF    Number  `json:"leakage_to_rf"`
		LeakageToIF    Number  `json:"leakage_to_if"`
		ToRFIsolation  Number  `json:"to_rf_isolation_db"`
		ToIFIsolation  Number  `json:"to_if_isolation_db"`
	} `json:"lo"`
	RF struct {
		Port                string  `json:"port"`
		Frequency           Number  `json:"frequency"`
		InputImpedance      Complex `json:"input_impedance"`
		ImageFrequency      Number  `json:"image_frequency"`
		ImageInputImpedance Complex `json:"image_input_impedance"`
	} `json:"rf"`
	IF struct {
		Port            string  `json:"port"`
		Frequency       Number  `json:"frequency"`
		OutputImpedance Complex `json:"output_impedance"`
	} `json:"if"`
	MixerFigures
	Method struct {
		SteadyState        string `json:"steady_state"`
		Harmonics          int    `json:"harmonics"`
		Iterations         int    `json:"iterations"`
		Residual           Number `json:"residual"`
		Sidebands          int    `json:"sidebands"`
		SidebandChangeDB   Number `json:"sideband_change_db"`
		ImpedanceChange    Number `json:"sideband_impedance_change"`
		ShootingDifference Number `json:"shooting_difference"`
	} `json:"method"`
}

// MixerFigures are the figures of one LO level.
type MixerFigures struct {
	ConversionLossDB      Number         `json:"conversion_loss_db"`
	ImageConversionLossDB Number         `json:"image_conversion_loss_db"`
	UpconversionLossDB    Number         `json:"upconversion_loss_db"`
	NoiseFigureSSBDB      Number         `json:"noise_figure_ssb_db"`
	NoiseFigureDSBDB      Number         `json:"noise_figure_dsb_db"`
	Noise                 MixerNoise     `json:"noise"`
	Diodes                []MixerDiode   `json:"diodes"`
	Cautions              []MixerCaution `json:"cautions"`
}

// MixerNoise is the mixer's noise figures under the LO.
type MixerNoise struct {
	OutputDensity Number `json:"output_density"`
	Contributions []struct {
		Source  string `json:"source"`
		Density Number `json:"density"`
		Share   Number `json:"share"`
	} `json:"contributions"`
}

// MixerDiode is one diode's currents and voltages under the LO.
type MixerDiode struct {
	Name               string `json:"name"`
	DCCurrent          Number `json:"dc_current"`
	PeakCurrent        Number `json:"peak_current"`
	PeakReverseVoltage Number `json:"peak_reverse_voltage"`
	MeanPower          Number `json:"mean_power"`
	BreakdownFraction  Number `json:"breakdown_fraction"`
}

// MixerCaution is one of the mixer analysis's typed cautions.
type MixerCaution struct {
	Kind    string `json:"kind"`
	Part    string `json:"part,omitempty"`
	Value   Number `json:"value"`
	Limit   Number `json:"limit"`
	Message string `json:"message"`
}

func mixerFiguresOf(r *mixer.Result) MixerFigures {
	f := MixerFigures{
		ConversionLossDB: Number(r.ConversionLossDB), ImageConversionLossDB: Number(r.ImageConversionLossDB),
		UpconversionLossDB: Number(r.UpconversionLossDB), NoiseFigureSSBDB: Number(r.Noise.FigureSSBDB),
		NoiseFigureDSBDB: Number(r.Noise.FigureDSBDB), Diodes: []MixerDiode{}, Cautions: []MixerCaution{},
	}
	f.Noise.OutputDensity = Number(r.Noise.OutputDensity)
	for _, c := range r.Noise.Contributions {
		f.Noise.Contributions = append(f.Noise.Contributions, struct {
			Source  string `json:"source"`
			Density Number `json:"density"`
			Share   Number `json:"share"`
		}{c.Source, Number(c.Density), Number(c.Share)})
	}
	for _, d := range r.Diodes {
		f.Diodes = append(f.Diodes, MixerDiode{d.Name, Number(d.DCCurrent), Number(d.PeakCurrent), Number(d.PeakReverseVoltage), Number(d.MeanPower), Number(d.BreakdownFraction)})
	}
	for _, c := range r.Cautions {
		f.Cautions = append(f.Cautions, MixerCaution{string(c.Kind), c.Part, Number(c.Value), Number(c.Limit), c.Message})
	}
	return f
}

// mixerHeaderOf fills what a single run and a sweep share.
func mixerHeaderOf(p *bias.Point, m *plan.Mixer) *Mixer {
	d := &Mixer{Circuit: p.Circuit.Name, File: p.Circuit.File, Temperature: Number(p.TemperatureK)}
	d.LO.Port, d.LO.Frequency, d.LO.LevelDBm = m.LOName, Number(m.Settings.LOFrequencyHz), Number(m.LOLevelDBm)
	d.RF.Port, d.RF.Frequency = m.RFName, Number(m.Settings.RFFrequencyHz)
	d.RF.ImageFrequency = Number(math.Abs(2*m.Settings.LOFrequencyHz - m.Settings.RFFrequencyHz))
	d.IF.Port, d.IF.Frequency = m.IFName, Number(m.Settings.IFHz())
	return d
}

// MixerOf returns `mixer --json` for the mixer m at the bias point p.
func MixerOf(p *bias.Point, m *plan.Mixer, r *mixer.Result) *Mixer {
	d := mixerHeaderOf(p, m)
	d.LO.AvailablePower, d.LO.AbsorbedPower = Number(r.LO.AvailableW), Number(r.LO.AbsorbedW)
	d.LO.InputImpedance = Complex(r.LO.InputImpedance)
	d.LO.LeakageToRF, d.LO.LeakageToIF = Number(r.LO.LeakageToRFW), Number(r.LO.LeakageToIFW)
	d.LO.ToRFIsolation = Number(report.IsolationDB(r.LO.AvailableW, r.LO.LeakageToRFW))
	d.LO.ToIFIsolation = Number(report.IsolationDB(r.LO.AvailableW, r.LO.LeakageToIFW))
	d.RF.InputImpedance, d.RF.ImageInputImpedance = Complex(r.RFInputImpedance), Complex(r.ImageInputImpedance)
	d.IF.OutputImpedance = Complex(r.IFOutputImpedance)
	d.MixerFigures = mixerFiguresOf(r)
	st := r.Stats
	d.Method.SteadyState, d.Method.Harmonics = st.Pump.Method, st.Pump.Harmonics
	d.Method.Iterations, d.Method.Residual = st.Pump.Iterations, Number(st.Pump.Residual)
	d.Method.Sidebands = st.Sidebands
	d.Method.SidebandChangeDB, d.Method.ImpedanceChange = Number(st.SidebandChange), Number(st.SidebandImpedanceChange)
	d.Method.ShootingDifference = Number(st.Shooting)
	return d
}

// MixerSweep is `mixer --sweep-lo-level --json`: the settings and
// each level's figures.
type MixerSweep struct {
	Circuit     string `json:"circuit"`
	File        string `json:"file"`
	Temperature Number `json:"temperature"`
	LO          struct {
		Port      string `json:"port"`
		Frequency Number `json:"frequency"`
		LevelDBm  Number `json:"level_dbm"`
	} `json:"lo"`
	RF struct {
		Port      string `json:"port"`
		Frequency Number `json:"frequency"`
	} `json:"rf"`
	IF struct {
		Port      string `json:"port"`
		Frequency Number `json:"frequency"`
	} `json:"if"`
	LevelSweep []MixerLevel `json:"level_sweep"`
}

// MixerLevel is one LO level of a sweep.
type MixerLevel struct {
	LevelDBm          Number  `json:"level_dbm"`
	Error             string  `json:"error,omitempty"`
	AbsorbedPower     Number  `json:"absorbed_power"`
	LOInputImpedance  Complex `json:"lo_input_impedance"`
	RFInputImpedance  Complex `json:"rf_input_impedance"`
	IFOutputImpedance Complex `json:"if_output_impedance"`
	ToRFIsolation     Number  `json:"lo_to_rf_isolation_db"`
	*MixerFigures
}

// MixerSweepOf returns `mixer --json` over the LO levels pts.
func MixerSweepOf(p *bias.Point, m *plan.Mixer, pts []mixer.LevelPoint) *MixerSweep {
	h := mixerHeaderOf(p, m)
	d := &MixerSweep{Circuit: h.Circuit, File: h.File, Temperature: h.Temperature, LevelSweep: []MixerLevel{}}
	d.LO.Port, d.LO.Frequency, d.LO.LevelDBm = h.LO.Port, h.LO.Frequency, h.LO.LevelDBm
	d.RF.Port, d.RF.Frequency = h.RF.Port, h.RF.Frequency
	d.IF.Port, d.IF.Frequency = h.IF.Port, h.IF.Frequency
	nan := Number(math.NaN())
	for _, p := range pts {
		l := MixerLevel{LevelDBm: Number(p.LevelDBm), AbsorbedPower: nan, ToRFIsolation: nan,
			LOInputImpedance: Complex(complex(math.NaN(), 0)), RFInputImpedance: Complex(complex(math.NaN(), 0)), IFOutputImpedance: Complex(complex(math.NaN(), 0))}
		if p.Err != nil {
			l.Error = p.Err.Error()
		}
		if r := p.Result; r != nil {
			f := mixerFiguresOf(r)
			l.MixerFigures = &f
			l.AbsorbedPower = Number(r.LO.AbsorbedW)
			l.LOInputImpedance, l.RFInputImpedance, l.IFOutputImpedance = Complex(r.LO.InputImpedance), Complex(r.RFInputImpedance), Complex(r.IFOutputImpedance)
			l.ToRFIsolation = Number(report.IsolationDB(r.LO.AvailableW, r.LO.LeakageToRFW))
		}
		d.LevelSweep = append(d.LevelSweep, l)
	}
	return d
}
