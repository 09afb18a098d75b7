package results

import (
	"encoding/csv"
	"io"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/bias/circuit"
	"qpoint/plots/report"
)

// sourceKey is a source's name for CSV headers and JSON.
func sourceKey(src ac.NoiseSource) string {
	parts := []string{src.Name, src.Where, string(src.Kind)}
	if src.Where == ac.InTermination {
		parts = []string{"port", src.Name, string(src.Kind)}
	}
	if src.Where == ac.InResistor {
		parts = []string{src.Name, string(src.Kind)}
	}
	return strings.ReplaceAll(strings.Join(parts, "_"), " ", "_")
}

// WriteNoiseCSV writes one row per frequency: densities, noise figure and
// each source's contribution, with a header naming each column's unit.
func WriteNoiseCSV(w io.Writer, o *plan.NoiseRun) error {
	r := o.Result
	cw := csv.NewWriter(w)
	header := []string{"frequency_Hz", "output_noise_V_per_rtHz", "input_referred_V_per_rtHz", "noise_figure_dB"}
	if o.Detection != nil {
		header = append(header, "nep_W_per_rtHz")
	}
	for _, src := range r.Sources {
		header = append(header, sourceKey(src)+"_V2_per_Hz")
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	for i, pt := range r.Points {
		row := []string{csvNumber(pt.FrequencyHz), csvNumber(pt.Density()), csvNumber(pt.InputReferred()), csvNumber(pt.FigureDB())}
		if o.Detection != nil {
			row = append(row, csvNumber(o.NEP(i)))
		}
		for _, c := range pt.Contributions {
			row = append(row, csvNumber(c))
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// csvNumber writes v in full precision, empty when it has no value.
func csvNumber(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// NoiseData is a CSV file of a noise figure's data: its name, beside the
// figures, and what writes it.
type NoiseData struct {
	Name  string
	Write func(io.Writer, *ac.NoiseResult) error
}

// NoiseFigureData are the data files the noise figures carry: the density
// and the contributions.
var NoiseFigureData = []NoiseData{
	{"noise-density.csv", WriteNoiseDensityCSV},
	{"noise-contributions.csv", WriteNoiseContributionsCSV},
}

// WriteNoiseDensityCSV writes the data of the density figure.
func WriteNoiseDensityCSV(w io.Writer, r *ac.NoiseResult) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"frequency_Hz", "output_noise_V_per_rtHz", "input_referred_V_per_rtHz", "noise_figure_dB"}); err != nil {
		return err
	}
	for _, pt := range r.Points {
		if err := cw.Write([]string{csvNumber(pt.FrequencyHz), csvNumber(pt.Density()), csvNumber(pt.InputReferred()), csvNumber(pt.FigureDB())}); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteNoiseContributionsCSV writes the data of the stacked-contributions
// figure: each source's output density, V²/Hz, in file order, so that
// cumulative sums across a row stack to the total.
func WriteNoiseContributionsCSV(w io.Writer, r *ac.NoiseResult) error {
	cw := csv.NewWriter(w)
	header := []string{"frequency_Hz"}
	for _, src := range r.Sources {
		header = append(header, sourceKey(src)+"_V2_per_Hz")
	}
	if err := cw.Write(append(header, "total_V2_per_Hz")); err != nil {
		return err
	}
	for _, pt := range r.Points {
		row := []string{csvNumber(pt.FrequencyHz)}
		for _, c := range pt.Contributions {
			row = append(row, csvNumber(c))
		}
		if err := cw.Write(append(row, csvNumber(pt.Total))); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// NoiseSource is one noise source of the circuit.
type NoiseSource struct {
	Name        string `json:"name"`
	Where       string `json:"where"`
	Kind        string `json:"kind"`
	Role        string `json:"role"`
	Temperature Number `json:"temperature,omitempty"`
	White       Number `json:"white"`   // A²/Hz
	Flicker     Number `json:"flicker"` // A², S = flicker / f
}

// NoisePoint is the noise at one frequency, with each source's contribution.
type NoisePoint struct {
	Frequency        Number   `json:"frequency"`
	OutputDensity    Number   `json:"output_density"` // V/√Hz
	InputReferred    *Number  `json:"input_referred,omitempty"`
	NoiseFigureDB    *Number  `json:"noise_figure_db,omitempty"`
	Gain             Complex  `json:"gain"`
	NEP              *Number  `json:"nep,omitempty"`               // W/√Hz
	VideoSensitivity *Number  `json:"video_sensitivity,omitempty"` // V/W, |γ(f)|
	Contributions    []Number `json:"contributions"`               // V²/Hz, one per source
}

// NoiseBand is the noise integrated over a band.
type NoiseBand struct {
	From                 Number   `json:"from"`
	To                   Number   `json:"to"`
	OutputRMS            Number   `json:"output_rms"`
	InputReferredRMS     *Number  `json:"input_referred_rms,omitempty"`
	AverageNoiseFigureDB *Number  `json:"average_noise_figure_db,omitempty"`
	Contributions        []Number `json:"contributions"` // V², one per source
	PerDecade            int      `json:"per_decade"`
}

// Detector is a detector's sensitivity limit: NEP and tangential sensitivity.
type Detector struct {
	Carrier               Number `json:"carrier"`
	VoltageSensitivity    Number `json:"voltage_sensitivity"` // V/W
	VideoFrom             Number `json:"video_from"`
	VideoTo               Number `json:"video_to"`
	VideoNoiseRMS         Number `json:"video_noise_rms"`
	NEP                   Number `json:"nep"` // W/√Hz at nep_frequency
	NEPFrequency          Number `json:"nep_frequency"`
	VideoTopResponse      Number `json:"video_top_response"` // |γ(f_top)/γ(0)|
	TangentialSensitivity Number `json:"tangential_sensitivity"`
	TangentialDBm         Number `json:"tangential_sensitivity_dbm"`
}

// Noise is `noise --json`.
type Noise struct {
	Circuit     string        `json:"circuit"`
	File        string        `json:"file"`
	Temperature Number        `json:"temperature"`
	Input       *string       `json:"input"`
	Output      string        `json:"output"`
	OutputPort  bool          `json:"output_is_port"`
	Sources     []NoiseSource `json:"sources"`
	Points      []NoisePoint  `json:"points"`
	Band        *NoiseBand    `json:"band,omitempty"`
	Detector    *Detector     `json:"detector,omitempty"`
}

// NoiseOf returns the noise document of the run o on the circuit c.
func NoiseOf(c *circuit.Circuit, o *plan.NoiseRun) *Noise {
	r := o.Result
	d := &Noise{Circuit: c.Name, File: c.File, Temperature: Number(r.TemperatureK), Output: o.Plan.OutputName,
		OutputPort: r.Settings.Output.Port >= 0, Sources: []NoiseSource{}, Points: []NoisePoint{}}
	if r.Settings.Input >= 0 {
		name := o.Plan.InputName
		d.Input = &name
	}
	for _, src := range r.Sources {
		j := NoiseSource{Name: src.Name, Where: src.Where, Kind: string(src.Kind), Role: report.NoiseRole(r, src),
			White: Number(src.White), Flicker: Number(src.Flicker)}
		if src.Kind == ac.ThermalNoise {
			j.Temperature = Number(src.TemperatureK)
		}
		d.Sources = append(d.Sources, j)
	}
	for i, pt := range r.Points {
		j := NoisePoint{Frequency: Number(pt.FrequencyHz), OutputDensity: Number(pt.Density()), Gain: Complex(pt.Gain),
			Contributions: make([]Number, len(pt.Contributions))}
		if r.Settings.Input >= 0 {
			j.InputReferred, j.NoiseFigureDB = ptr(pt.InputReferred()), ptr(pt.FigureDB())
		}
		if o.Detection != nil {
			j.NEP = ptr(o.NEP(i))
			j.VideoSensitivity = ptr(cmplx.Abs(o.Video[i]))
		}
		for k, c := range pt.Contributions {
			j.Contributions[k] = Number(c)
		}
		d.Points = append(d.Points, j)
	}
	if b := o.Band; b != nil {
		j := &NoiseBand{From: Number(b.FromHz), To: Number(b.ToHz), OutputRMS: Number(b.RMS()), PerDecade: b.PerDecade,
			Contributions: make([]Number, len(b.Contributions))}
		if r.Settings.Input >= 0 {
			j.InputReferredRMS, j.AverageNoiseFigureDB = ptr(b.InputReferredRMS()), ptr(10*math.Log10(b.AverageFactor()))
		}
		for k, c := range b.Contributions {
			j.Contributions[k] = Number(c)
		}
		d.Band = j
	}
	if det := o.Detection; det != nil {
		d.Detector = &Detector{Carrier: Number(det.CarrierHz), VoltageSensitivity: Number(det.Sensitivity),
			VideoFrom: Number(det.Video.FromHz), VideoTo: Number(det.Video.ToHz), VideoNoiseRMS: Number(det.Video.RMS()),
			NEP: Number(det.NEP), NEPFrequency: Number(det.SpotHz), VideoTopResponse: Number(det.TopResponse), TangentialSensitivity: Number(det.TangentialW), TangentialDBm: Number(det.TangentialDBm())}
	}
	return d
}
