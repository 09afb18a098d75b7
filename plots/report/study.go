package report

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"qpoint/ac/study"
	"qpoint/bias/si"
)

// StudyColumn is one StudyColumn of the study's table and CSV.
type StudyColumn struct {
	Key   string // CSV header with unit
	Title string // table heading
	Unit  string // SI unit for the table ("" for dB figures)
	Get   func(st *study.Step) float64
}

// AxisHeader returns the name and unit of a study axis's column, or
// frequency's.
func AxisHeader(a *study.Axis, frequency bool) (string, string) {
	if frequency {
		return "frequency", "Hz"
	}
	return a.Vary.Text, a.Vary.Quantity.Unit()
}

// StudyColumns are the columns a study's table, CSV and JSON hold: the
// varied values, then each diode's Q point, the response, distortion and
// detector figures that were found.
func StudyColumns(r *study.Result) []StudyColumn {
	var cols []StudyColumn
	name, unit := AxisHeader(&r.Settings.Axis, false)
	cols = append(cols, StudyColumn{name + "_" + UnitOrNumber(unit), name, unit, func(st *study.Step) float64 { return st.Values[0] }})
	if r.Settings.Second != nil {
		n2, u2 := AxisHeader(r.Settings.Second, r.Settings.SecondIsFrequency)
		cols = append(cols, StudyColumn{n2 + "_" + UnitOrNumber(u2), n2, u2, func(st *study.Step) float64 { return st.Values[1] }})
	}
	first := r.FirstSolved()
	if first == nil {
		return cols
	}
	for k, d := range first.Diodes {
		k := k
		cols = append(cols,
			StudyColumn{d.Name + ".current_A", d.Name + " current", "A", func(st *study.Step) float64 { return st.Diodes[k].Current }},
			StudyColumn{d.Name + ".dynamic_resistance_ohm", d.Name + " r_d", "Ω", func(st *study.Step) float64 { return st.Diodes[k].DynamicResistance }},
			StudyColumn{d.Name + ".junction_capacitance_F", d.Name + " C_j", "F", func(st *study.Step) float64 { return st.Diodes[k].JunctionCapacitance }},
			StudyColumn{d.Name + ".video_resistance_ohm", d.Name + " R_video", "Ω", func(st *study.Step) float64 { return st.Diodes[k].VideoResistance }})
	}
	nf := len(first.Responses)
	for fi := 0; fi < nf; fi++ {
		fi := fi
		tag := ""
		if !r.Settings.SecondIsFrequency {
			tag = "@" + si.Format(first.Responses[fi].FrequencyHz, "Hz", 6)
		}
		ftag := strings.ReplaceAll(tag, " ", "")
		if len(r.Ports) > 1 {
			cols = append(cols, StudyColumn{"s21_dB" + ftag, "S21 dB" + tag, "", func(st *study.Step) float64 { return 20 * math.Log10(cmplx.Abs(st.Responses[fi].S[1][0])) }})
		}
		cols = append(cols,
			StudyColumn{"s11_dB" + ftag, "S11 dB" + tag, "", func(st *study.Step) float64 { return 20 * math.Log10(cmplx.Abs(st.Responses[fi].S[0][0])) }},
			StudyColumn{"zin_re_ohm" + ftag, "Re Zin" + tag, "Ω", func(st *study.Step) float64 { return real(st.Responses[fi].InputImpedance[0]) }},
			StudyColumn{"zin_im_ohm" + ftag, "Im Zin" + tag, "Ω", func(st *study.Step) float64 { return imag(st.Responses[fi].InputImpedance[0]) }})
		for pk, p := range r.Probes {
			pk := pk
			cols = append(cols, StudyColumn{"probe." + p + "_dB" + ftag, p + " dB" + tag, "", func(st *study.Step) float64 { return 20 * math.Log10(cmplx.Abs(st.Responses[fi].Probes[pk])) }})
		}
		for k, d := range first.Diodes {
			k := k
			cols = append(cols,
				StudyColumn{d.Name + ".current_sensitivity_A/W" + ftag, d.Name + " β A/W" + tag, "", func(st *study.Step) float64 { return st.Diodes[k].CurrentSensitivity[fi] }},
				StudyColumn{d.Name + ".voltage_sensitivity_V/W" + ftag, d.Name + " γ V/W" + tag, "", func(st *study.Step) float64 { return st.Diodes[k].VoltageSensitivity[fi] }})
		}
	}
	if len(first.NoiseFigureDB) > 0 {
		for fi := range first.NoiseFigureDB {
			fi := fi
			tag := ""
			if !r.Settings.SecondIsFrequency {
				tag = "@" + si.Format(first.Responses[fi].FrequencyHz, "Hz", 6)
			}
			cols = append(cols, StudyColumn{"noise_figure_dB" + strings.ReplaceAll(tag, " ", ""), "NF dB" + tag, "", func(st *study.Step) float64 { return st.NoiseFigureDB[fi] }})
		}
	}
	for di, d := range first.Distortion {
		di := di
		tag := "@" + si.Format(d.FrequencyHz, "Hz", 6)
		ftag := strings.ReplaceAll(tag, " ", "")
		cols = append(cols,
			StudyColumn{"hd2_dBc" + ftag, "HD2 dBc" + tag, "", func(st *study.Step) float64 { return st.Distortion[di].HD2dBc }},
			StudyColumn{"hd3_dBc" + ftag, "HD3 dBc" + tag, "", func(st *study.Step) float64 { return st.Distortion[di].HD3dBc }},
			StudyColumn{"dc_shift_V" + ftag, "DC shift" + tag, "V", func(st *study.Step) float64 { return st.Distortion[di].DCShift }},
			StudyColumn{"sensitivity_V/W" + ftag, "sensitivity V/W" + tag, "", func(st *study.Step) float64 { return st.Distortion[di].Sensitivity }})
	}
	if r.Settings.Mixer != nil {
		mx := func(st *study.Step) study.MixerFigures {
			if st.Mixer == nil || st.Mixer.Breakdown {
				nan := math.NaN()
				return study.MixerFigures{ConversionLossDB: nan, NoiseFigureSSBDB: nan, LOAbsorbedDBm: nan}
			}
			return *st.Mixer
		}
		cols = append(cols,
			StudyColumn{"conversion_loss_dB", "conversion loss dB", "", func(st *study.Step) float64 { return mx(st).ConversionLossDB }},
			StudyColumn{"mixer_noise_figure_dB", "mixer NF dB", "", func(st *study.Step) float64 { return mx(st).NoiseFigureSSBDB }},
			StudyColumn{"lo_power_dBm", "LO absorbed dBm", "", func(st *study.Step) float64 { return mx(st).LOAbsorbedDBm }})
	}
	if r.Settings.Detector != nil {
		cols = append(cols,
			StudyColumn{"nep_W/rtHz", "NEP", "W/√Hz", func(st *study.Step) float64 { return Detection(st).NEP }},
			StudyColumn{"tss_dBm", "TSS dBm", "", func(st *study.Step) float64 { return Detection(st).TangentialDBm }})
	}
	return cols
}

// Detection returns a step's detector figures, NaN where the output does
// not detect.
func Detection(st *study.Step) study.Detection {
	if st.Detection == nil || !st.Detection.Detects {
		return study.Detection{NEP: math.NaN(), TangentialDBm: math.NaN()}
	}
	return *st.Detection
}

// UnitOrNumber is a unit for a column name: "1" for a plain number.
func UnitOrNumber(u string) string {
	if u == "" {
		return "1"
	}
	return u
}

// AxisCount is the number of varied quantities in a study: 1 or 2.
func AxisCount(r *study.Result) int {
	if r.Settings.Second != nil {
		return 2
	}
	return 1
}

// FormatCell prints a study value in its unit: temperatures in °C,
// others with SI prefixes, plain numbers to two decimals.
func FormatCell(v float64, unit string) string {
	if unit == "" {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return "—"
		}
		if math.Abs(v) >= 1e4 || (math.Abs(v) < 1e-2 && v != 0) {
			return si.Format(v, "", 4)
		}
		return strconv.FormatFloat(v, 'f', 2, 64)
	}
	if unit == "K" {
		return fmt.Sprintf("%.2f °C", v-273.15)
	}
	u := unit
	if u == "ohm" {
		u = "Ω"
	}
	return si.Format(v, u, 4)
}

// FormatMeasure prints a measure's value with its unit: decibel figures
// to two decimals, the rest with SI prefixes.
func FormatMeasure(v float64, unit string) string {
	switch unit {
	case "dB", "dBc", "dBm":
		return strconv.FormatFloat(v, 'f', 2, 64) + " " + unit
	case "ohm":
		return si.Format(v, "Ω", 4)
	}
	return si.Format(v, unit, 4)
}

// FormatDifference prints a difference of the varied quantity: a
// temperature difference stays in kelvin rather than becoming a Celsius
// reading.
func FormatDifference(v float64, unit string) string {
	if unit == "K" {
		return si.Format(v, "K", 4)
	}
	return FormatCell(v, unit)
}

// StudyTable is a study's table: a row per step, the columns cols.
func StudyTable(r *study.Result, cols []StudyColumn) *Table {
	t := &Table{Caption: "Study"}
	for _, col := range cols {
		t.Header = append(t.Header, col.Title)
	}
	for i := range r.Steps {
		st := &r.Steps[i]
		var cells []string
		for k, col := range cols {
			if st.Err != nil && k >= AxisCount(r) {
				cells = append(cells, "failed")
				continue
			}
			cells = append(cells, FormatCell(col.Get(st), col.Unit))
		}
		t.Add(cells...)
	}
	return t
}
