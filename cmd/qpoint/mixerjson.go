package main

import (
	"math"

	"qpoint/ac/mixer"
	"qpoint/plots/report"
)

// mixerJSON is the document of `mixer --json`, in the shape
// circuit-file.md fixes (lo, rf, if, conversion_loss_db,
// image_conversion_loss_db, noise_figure_ssb_db, noise_figure_dsb_db,
// diodes, method), with more keys beside.
type mixerJSON struct {
	Circuit     string `json:"circuit"`
	File        string `json:"file"`
	Temperature number `json:"temperature"`
	LO          struct {
		Port           string      `json:"port"`
		Frequency      number      `json:"frequency"`
		LevelDBm       number      `json:"level_dbm"`
		AvailablePower number      `json:"available_power"`
		AbsorbedPower  number      `json:"absorbed_power"`
		InputImpedance complexJSON `json:"input_impedance"`
		LeakageToRF    number      `json:"leakage_to_rf"`
		LeakageToIF    number      `json:"leakage_to_if"`
		ToRFIsolation  number      `json:"to_rf_isolation_db"`
		ToIFIsolation  number      `json:"to_if_isolation_db"`
	} `json:"lo"`
	RF struct {
		Port                string      `json:"port"`
		Frequency           number      `json:"frequency"`
		InputImpedance      complexJSON `json:"input_impedance"`
		ImageFrequency      number      `json:"image_frequency"`
		ImageInputImpedance complexJSON `json:"image_input_impedance"`
	} `json:"rf"`
	IF struct {
		Port            string      `json:"port"`
		Frequency       number      `json:"frequency"`
		OutputImpedance complexJSON `json:"output_impedance"`
	} `json:"if"`
	mixerFiguresJSON
	Method struct {
		SteadyState        string `json:"steady_state"`
		Harmonics          int    `json:"harmonics"`
		Iterations         int    `json:"iterations"`
		Residual           number `json:"residual"`
		Sidebands          int    `json:"sidebands"`
		SidebandChangeDB   number `json:"sideband_change_db"`
		ImpedanceChange    number `json:"sideband_impedance_change"`
		ShootingDifference number `json:"shooting_difference"`
	} `json:"method"`
}

// mixerFiguresJSON are the figures of one LO level.
type mixerFiguresJSON struct {
	ConversionLossDB      number             `json:"conversion_loss_db"`
	ImageConversionLossDB number             `json:"image_conversion_loss_db"`
	UpconversionLossDB    number             `json:"upconversion_loss_db"`
	NoiseFigureSSBDB      number             `json:"noise_figure_ssb_db"`
	NoiseFigureDSBDB      number             `json:"noise_figure_dsb_db"`
	Noise                 mixerNoiseJSON     `json:"noise"`
	Diodes                []mixerDiodeJSON   `json:"diodes"`
	Cautions              []mixerCautionJSON `json:"cautions"`
}

type mixerNoiseJSON struct {
	OutputDensity number `json:"output_density"`
	Contributions []struct {
		Source  string `json:"source"`
		Density number `json:"density"`
		Share   number `json:"share"`
	} `json:"contributions"`
}

type mixerDiodeJSON struct {
	Name               string `json:"name"`
	DCCurrent          number `json:"dc_current"`
	PeakCurrent        number `json:"peak_current"`
	PeakReverseVoltage number `json:"peak_reverse_voltage"`
	MeanPower          number `json:"mean_power"`
	BreakdownFraction  number `json:"breakdown_fraction"`
}

type mixerCautionJSON struct {
	Kind    string `json:"kind"`
	Part    string `json:"part,omitempty"`
	Value   number `json:"value"`
	Limit   number `json:"limit"`
	Message string `json:"message"`
}

func mixerFiguresOf(r *mixer.Result) mixerFiguresJSON {
	f := mixerFiguresJSON{
		ConversionLossDB: number(r.ConversionLossDB), ImageConversionLossDB: number(r.ImageConversionLossDB),
		UpconversionLossDB: number(r.UpconversionLossDB), NoiseFigureSSBDB: number(r.Noise.FigureSSBDB),
		NoiseFigureDSBDB: number(r.Noise.FigureDSBDB), Diodes: []mixerDiodeJSON{}, Cautions: []mixerCautionJSON{},
	}
	f.Noise.OutputDensity = number(r.Noise.OutputDensity)
	for _, c := range r.Noise.Contributions {
		f.Noise.Contributions = append(f.Noise.Contributions, struct {
			Source  string `json:"source"`
			Density number `json:"density"`
			Share   number `json:"share"`
		}{c.Source, number(c.Density), number(c.Share)})
	}
	for _, d := range r.Diodes {
		f.Diodes = append(f.Diodes, mixerDiodeJSON{d.Name, number(d.DCCurrent), number(d.PeakCurrent), number(d.PeakReverseVoltage), number(d.MeanPower), number(d.BreakdownFraction)})
	}
	for _, c := range r.Cautions {
		f.Cautions = append(f.Cautions, mixerCautionJSON{string(c.Kind), c.Part, number(c.Value), number(c.Limit), c.Message})
	}
	return f
}

// mixerHeaderOf fills what a single run and a sweep share.
func mixerHeaderOf(s *mixerSetup) *mixerJSON {
	m := s.plan
	d := &mixerJSON{Circuit: s.c.Name, File: s.c.File, Temperature: number(s.p.TemperatureK)}
	d.LO.Port, d.LO.Frequency, d.LO.LevelDBm = m.LOName, number(m.Settings.LOFrequencyHz), number(m.LOLevelDBm)
	d.RF.Port, d.RF.Frequency = m.RFName, number(m.Settings.RFFrequencyHz)
	d.RF.ImageFrequency = number(math.Abs(2*m.Settings.LOFrequencyHz - m.Settings.RFFrequencyHz))
	d.IF.Port, d.IF.Frequency = m.IFName, number(m.Settings.IFHz())
	return d
}

func mixerDocument(s *mixerSetup, r *mixer.Result) *mixerJSON {
	d := mixerHeaderOf(s)
	d.LO.AvailablePower, d.LO.AbsorbedPower = number(r.LO.AvailableW), number(r.LO.AbsorbedW)
	d.LO.InputImpedance = complexJSON(r.LO.InputImpedance)
	d.LO.LeakageToRF, d.LO.LeakageToIF = number(r.LO.LeakageToRFW), number(r.LO.LeakageToIFW)
	d.LO.ToRFIsolation = number(report.IsolationDB(r.LO.AvailableW, r.LO.LeakageToRFW))
	d.LO.ToIFIsolation = number(report.IsolationDB(r.LO.AvailableW, r.LO.LeakageToIFW))
	d.RF.InputImpedance, d.RF.ImageInputImpedance = complexJSON(r.RFInputImpedance), complexJSON(r.ImageInputImpedance)
	d.IF.OutputImpedance = complexJSON(r.IFOutputImpedance)
	d.mixerFiguresJSON = mixerFiguresOf(r)
	st := r.Stats
	d.Method.SteadyState, d.Method.Harmonics = st.Pump.Method, st.Pump.Harmonics
	d.Method.Iterations, d.Method.Residual = st.Pump.Iterations, number(st.Pump.Residual)
	d.Method.Sidebands = st.Sidebands
	d.Method.SidebandChangeDB, d.Method.ImpedanceChange = number(st.SidebandChange), number(st.SidebandImpedanceChange)
	d.Method.ShootingDifference = number(st.Shooting)
	return d
}

// mixerSweepJSON is `mixer --sweep-lo-level --json`: the settings and
// each level's figures.
type mixerSweepJSON struct {
	Circuit     string `json:"circuit"`
	File        string `json:"file"`
	Temperature number `json:"temperature"`
	LO          struct {
		Port      string `json:"port"`
		Frequency number `json:"frequency"`
		LevelDBm  number `json:"level_dbm"`
	} `json:"lo"`
	RF struct {
		Port      string `json:"port"`
		Frequency number `json:"frequency"`
	} `json:"rf"`
	IF struct {
		Port      string `json:"port"`
		Frequency number `json:"frequency"`
	} `json:"if"`
	LevelSweep []mixerLevelJSON `json:"level_sweep"`
}

type mixerLevelJSON struct {
	LevelDBm          number      `json:"level_dbm"`
	Error             string      `json:"error,omitempty"`
	AbsorbedPower     number      `json:"absorbed_power"`
	LOInputImpedance  complexJSON `json:"lo_input_impedance"`
	RFInputImpedance  complexJSON `json:"rf_input_impedance"`
	IFOutputImpedance complexJSON `json:"if_output_impedance"`
	ToRFIsolation     number      `json:"lo_to_rf_isolation_db"`
	*mixerFiguresJSON
}

func mixerSweepDocument(s *mixerSetup, pts []mixer.LevelPoint) *mixerSweepJSON {
	h := mixerHeaderOf(s)
	d := &mixerSweepJSON{Circuit: h.Circuit, File: h.File, Temperature: h.Temperature, LevelSweep: []mixerLevelJSON{}}
	d.LO.Port, d.LO.Frequency, d.LO.LevelDBm = h.LO.Port, h.LO.Frequency, h.LO.LevelDBm
	d.RF.Port, d.RF.Frequency = h.RF.Port, h.RF.Frequency
	d.IF.Port, d.IF.Frequency = h.IF.Port, h.IF.Frequency
	nan := number(math.NaN())
	for _, p := range pts {
		l := mixerLevelJSON{LevelDBm: number(p.LevelDBm), AbsorbedPower: nan, ToRFIsolation: nan,
			LOInputImpedance: complexJSON(complex(math.NaN(), 0)), RFInputImpedance: complexJSON(complex(math.NaN(), 0)), IFOutputImpedance: complexJSON(complex(math.NaN(), 0))}
		if p.Err != nil {
			l.Error = p.Err.Error()
		}
		if r := p.Result; r != nil {
			f := mixerFiguresOf(r)
			l.mixerFiguresJSON = &f
			l.AbsorbedPower = number(r.LO.AbsorbedW)
			l.LOInputImpedance, l.RFInputImpedance, l.IFOutputImpedance = complexJSON(r.LO.InputImpedance), complexJSON(r.RFInputImpedance), complexJSON(r.IFOutputImpedance)
			l.ToRFIsolation = number(report.IsolationDB(r.LO.AvailableW, r.LO.LeakageToRFW))
		}
		d.LevelSweep = append(d.LevelSweep, l)
	}
	return d
}
