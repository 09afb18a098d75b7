package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots"
	"qpoint/plots/report"
	"qpoint/smallsignal"
)

// Detector defaults: the video band a tangential sensitivity is quoted in
// when the command line gives none, and its low edge.
const (
	defaultVideoToHz   = 2e6
	defaultVideoFromHz = 1
)

type noiseFlags struct {
	input, output     string
	from, to          string
	perDecade, points int
	temperature       string
	bandwidth         string
	carrier           string
	videoBandwidth    string
	asJSON            bool
	csvPath           string
	plotsDir          string
	rows              int
	sets              []string
}

func newNoiseCmd() *cobra.Command {
	var fl noiseFlags
	cmd := &cobra.Command{
		Use:   "noise FILE",
		Short: "Small-signal noise at the bias point: density, noise figure, contributions, detector sensitivity",
		Long: `noise linearises the circuit at its DC bias point and finds the noise at the
output port or node across frequency. Every resistor and diode series
resistance makes thermal noise 4kT/R at the circuit temperature; every
junction makes shot noise 2q(I_D + 2 I_S), and flicker noise K·|I_D|^a/f
where its model gives flicker_coefficient; every port's reference
resistance makes thermal noise at the port's noise_temperature (290 K
unless the file says otherwise).

It prints, at a handful of frequencies:
  output noise     V/√Hz at the output, every source as operated
  input-referred   the circuit's own noise as an EMF in series with the
                   input port's generator, V/√Hz
  noise figure     with the input port's source at 290 K and the output
                   port's load left out (IEEE definition)
then the noise integrated over a band (--bandwidth, else the sweep) and
each source's share of it.

Where the output is a detector's (a carrier from --carrier or the file's
analysis.distortion, at -20 dBm, leaves more rectified DC than carrier at
an output that is not AC-coupled), or when --carrier or --video-bandwidth
ask for it, it also reports the voltage sensitivity, the
noise-equivalent power and the tangential sensitivity in the video band
(--video-bandwidth, default 1 Hz to 2 MHz); the default sweep is then that
video band. Noise is that of the network linearised at its DC bias point:
a mixer's conversion noise, with a local oscillator pumping the diodes,
is qpoint mixer's.`,
		Example: `  qpoint noise testdata/demo/attenuator.yaml
  qpoint noise testdata/demo/detector.yaml --video-bandwidth 10MHz
  qpoint noise detector.yaml --carrier 915MHz --video-bandwidth 100Hz:1MHz --json
  qpoint noise attenuator.yaml --from 100MHz --to 3GHz --bandwidth 800MHz:1GHz --csv noise.csv`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runNoise(cmd, args[0], &fl)
		},
	}
	f := cmd.Flags()
	addSetFlag(cmd, &fl.sets)
	f.StringVar(&fl.input, "input", "", "port of the signal source (default: the file's distortion input, else the first port)")
	f.StringVar(&fl.output, "output", "", "output port or node (default: the file's distortion output, else the last port)")
	f.StringVar(&fl.from, "from", "", "lowest frequency of the sweep, e.g. 10MHz")
	f.StringVar(&fl.to, "to", "", "highest frequency of the sweep, e.g. 6GHz")
	f.IntVar(&fl.perDecade, "per-decade", 0, "points per decade on a logarithmic grid")
	f.IntVar(&fl.points, "points", 0, "number of points on a linear grid (instead of --per-decade)")
	f.StringVar(&fl.temperature, "temperature", "", "circuit temperature, overriding the file's (e.g. 85C)")
	f.StringVar(&fl.bandwidth, "bandwidth", "", "integrate the noise over LOW:HIGH, e.g. 800MHz:1GHz (default: the sweep)")
	f.StringVar(&fl.carrier, "carrier", "", "carrier frequency a detector detects (default: the file's analysis.distortion frequency)")
	f.StringVar(&fl.videoBandwidth, "video-bandwidth", "", "detector video bandwidth: HIGH (from 1 Hz) or LOW:HIGH [2MHz]")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of tables")
	f.StringVar(&fl.csvPath, "csv", "", "write every point, with each source's contribution, to this CSV file")
	f.StringVar(&fl.plotsDir, "plots", "", "write the noise figures (density; stacked contributions) as SVG and PNG, with their data as CSV, into this directory")
	f.IntVar(&fl.rows, "rows", 9, "rows in the printed table")
	return cmd
}

// noiseSetup is a resolved noise run: the circuit, its bias and network,
// and the plan.
type noiseSetup struct {
	c    *circuit.Circuit
	p    *bias.Point
	nw   *smallsignal.Network
	plan *plan.Noise
}

// parseBand reads LOW:HIGH, or HIGH alone when lowDefault is positive.
func parseBand(flag, s string, lowDefault float64) (lo, hi float64, err error) {
	parts := strings.Split(s, ":")
	example := "LOW:HIGH, e.g. 800MHz:1GHz"
	if lowDefault > 0 {
		example = "HIGH or LOW:HIGH, e.g. 2MHz or 10Hz:2MHz"
	}
	bad := func(e error) (float64, float64, error) {
		if e != nil {
			return 0, 0, inputError(fmt.Errorf("flag --%s: %w; accepted: %s", flag, e, example))
		}
		return 0, 0, inputError(fmt.Errorf("flag --%s: `%s` is not a rising band; accepted: %s within 1 mHz to 1 THz", flag, s, example))
	}
	switch {
	case len(parts) == 1 && lowDefault > 0:
		lo = lowDefault
		if hi, err = circuit.ParseBounded(strings.TrimSpace(parts[0]), circuit.Frequency); err != nil {
			return bad(err)
		}
	case len(parts) == 2:
		if lo, err = circuit.ParseBounded(strings.TrimSpace(parts[0]), circuit.Frequency); err != nil {
			return bad(err)
		}
		if hi, err = circuit.ParseBounded(strings.TrimSpace(parts[1]), circuit.Frequency); err != nil {
			return bad(err)
		}
	default:
		return bad(nil)
	}
	if !(hi > lo) || ac.CheckFrequency(lo) != nil || ac.CheckFrequency(hi) != nil {
		return bad(nil)
	}
	return lo, hi, nil
}

// resolveNoiseFor reads the flags into a request, solves the bias (when p
// is nil) and linearises it, and resolves the plan.
func resolveNoiseFor(c *circuit.Circuit, fl *noiseFlags, p *bias.Point) (*noiseSetup, error) {
	req := plan.NoiseRequest{Input: fl.input, Output: fl.output}
	var err error
	if req.Grid, err = gridRequest(fl.from, fl.to, fl.perDecade, fl.points); err != nil {
		return nil, err
	}
	if fl.carrier != "" {
		if req.CarrierHz, err = circuit.ParseBounded(fl.carrier, circuit.Frequency); err != nil {
			return nil, inputError(fmt.Errorf("flag --carrier: %w", err))
		}
	}
	if fl.videoBandwidth != "" {
		lo, hi, err := parseBand("video-bandwidth", fl.videoBandwidth, plan.DefaultVideoFromHz)
		if err != nil {
			return nil, err
		}
		req.VideoBandHz = [2]float64{lo, hi}
	}
	if fl.bandwidth != "" {
		lo, hi, err := parseBand("bandwidth", fl.bandwidth, 0)
		if err != nil {
			return nil, err
		}
		req.BandHz = [2]float64{lo, hi}
	}
	// The path's errors come before the bias is solved.
	if _, err := plan.SignalPath(c, fl.input, fl.output); err != nil {
		return nil, planError(err)
	}
	if p == nil {
		if p, err = solveWithTemperature(c, fl.temperature); err != nil {
			return nil, err
		}
	}
	s := &noiseSetup{c: c, p: p}
	if s.nw, err = smallsignal.New(p); err != nil {
		return nil, analysisError(err)
	}
	if s.plan, err = plan.ResolveNoise(c, s.nw, req); err != nil {
		return nil, planError(err)
	}
	return s, nil
}

func runNoise(cmd *cobra.Command, path string, fl *noiseFlags) error {
	g := guardOf(cmd)
	if fl.rows < 1 {
		return inputError(fmt.Errorf("flag --rows: %d; accepted: 1 or more", fl.rows))
	}
	c, err := g.loadCircuit(cmd.ErrOrStderr(), path, fl.sets, fl.temperature)
	if err != nil {
		return err
	}
	if err := g.checkOutputsEarly(fl.plotsDir, fl.csvPath); err != nil {
		return err
	}
	s, err := resolveNoiseFor(c, fl, nil)
	if err != nil {
		return err
	}
	o, err := s.plan.Run(s.nw)
	if err != nil {
		return analysisError(err)
	}
	cautionOutside(cmd.ErrOrStderr(), o.Result.Outside)
	if err := g.writeNoiseFiles(fl, o); err != nil {
		return err
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		return writeJSON(out, noiseDocument(s, o))
	}
	writeNoiseText(out, s, o, fl.rows)
	fmt.Fprintln(out)
	if fl.csvPath != "" {
		fmt.Fprintf(out, "CSV written to %s\n", fl.csvPath)
	}
	if fl.plotsDir != "" {
		fmt.Fprintf(out, "figures written to %s (noise-density, noise-contributions: SVG, PNG and CSV data)\n", fl.plotsDir)
	}
	return nil
}

// writeNoiseFiles writes the CSV file and the figures with their data
// the flags name, after checking every one of them.
func (g *fileGuard) writeNoiseFiles(fl *noiseFlags, o *plan.NoiseRun) error {
	// The figures' data go beside them.
	tables := []struct {
		name  string
		write func(io.Writer, *ac.NoiseResult) error
	}{
		{"noise-density.csv", writeNoiseDensityCSV},
		{"noise-contributions.csv", writeNoiseContributionsCSV},
	}
	paths := []string{fl.csvPath}
	var figs []*plots.Figure
	if fl.plotsDir != "" {
		figs = report.NoiseFigures(o.Result)
		for _, tb := range tables {
			paths = append(paths, filepath.Join(fl.plotsDir, tb.name))
		}
		paths = append(paths, figurePaths(fl.plotsDir, figs)...)
	}
	// Every named output is checked before any is written.
	if err := g.refuseInputs(paths...); err != nil {
		return err
	}
	if fl.csvPath != "" {
		if err := g.writeFileAtomic(fl.csvPath, func(w io.Writer) error { return writeNoiseCSV(w, o) }); err != nil {
			return err
		}
	}
	if fl.plotsDir == "" {
		return nil
	}
	if err := os.MkdirAll(fl.plotsDir, 0o755); err != nil {
		return inputError(fmt.Errorf("flag --plots: %w", err))
	}
	for _, tb := range tables {
		if err := g.writeFileAtomic(filepath.Join(fl.plotsDir, tb.name), func(w io.Writer) error { return tb.write(w, o.Result) }); err != nil {
			return err
		}
	}
	return g.writeFigures(fl.plotsDir, figs)
}

// writeNoiseText prints the noise tables: density, band, sources and a
// detector's figures.
func writeNoiseText(out io.Writer, s *noiseSetup, o *plan.NoiseRun, rows int) {
	writeNoiseHeader(out, s)
	report.NoiseTable(o, rows).WriteText(out)
	for _, n := range report.NoiseNotes(o) {
		fmt.Fprintf(out, "  %s\n", n)
	}
	if o.Band != nil {
		report.BandTable(o).WriteText(out)
		report.SourceTable(o).WriteText(out)
	}
	if o.Detection != nil {
		t, notes := report.DetectorTable(o)
		t.WriteText(out)
		for _, n := range notes {
			fmt.Fprintf(out, "  %s\n", n)
		}
	}
}

func writeNoiseHeader(w io.Writer, s *noiseSetup) {
	fmt.Fprintf(w, "%s\n", s.c.Name)
	fmt.Fprintf(w, "  file         %s\n", s.c.File)
	writeOverrides(w, s.c)
	fmt.Fprintf(w, "  bias         %s\n", report.BiasLine(s.p))
	for _, line := range report.NoiseSetupLines(s.c, s.nw, s.plan) {
		fmt.Fprintf(w, "  %-12s %s\n", line[0], line[1])
	}
}

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

// writeNoiseCSV writes one row per frequency: densities, noise figure and
// each source's contribution, with a header naming each column's unit.
func writeNoiseCSV(w io.Writer, o *plan.NoiseRun) error {
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

// writeNoiseDensityCSV writes the data of the density figure.
func writeNoiseDensityCSV(w io.Writer, r *ac.NoiseResult) error {
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

// writeNoiseContributionsCSV writes the data of the stacked-contributions
// figure: each source's output density, V²/Hz, in file order, so that
// cumulative sums across a row stack to the total.
func writeNoiseContributionsCSV(w io.Writer, r *ac.NoiseResult) error {
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

type noiseSourceJSON struct {
	Name        string `json:"name"`
	Where       string `json:"where"`
	Kind        string `json:"kind"`
	Role        string `json:"role"`
	Temperature number `json:"temperature,omitempty"`
	White       number `json:"white"`   // A²/Hz
	Flicker     number `json:"flicker"` // A², S = flicker / f
}

type noisePointJSON struct {
	Frequency        number      `json:"frequency"`
	OutputDensity    number      `json:"output_density"` // V/√Hz
	InputReferred    *number     `json:"input_referred,omitempty"`
	NoiseFigureDB    *number     `json:"noise_figure_db,omitempty"`
	Gain             complexJSON `json:"gain"`
	NEP              *number     `json:"nep,omitempty"`               // W/√Hz
	VideoSensitivity *number     `json:"video_sensitivity,omitempty"` // V/W, |γ(f)|
	Contributions    []number    `json:"contributions"`               // V²/Hz, one per source
}

type noiseBandJSON struct {
	From                 number   `json:"from"`
	To                   number   `json:"to"`
	OutputRMS            number   `json:"output_rms"`
	InputReferredRMS     *number  `json:"input_referred_rms,omitempty"`
	AverageNoiseFigureDB *number  `json:"average_noise_figure_db,omitempty"`
	Contributions        []number `json:"contributions"` // V², one per source
	PerDecade            int      `json:"per_decade"`
}

type detectorJSON struct {
	Carrier               number `json:"carrier"`
	VoltageSensitivity    number `json:"voltage_sensitivity"` // V/W
	VideoFrom             number `json:"video_from"`
	VideoTo               number `json:"video_to"`
	VideoNoiseRMS         number `json:"video_noise_rms"`
	NEP                   number `json:"nep"` // W/√Hz at nep_frequency
	NEPFrequency          number `json:"nep_frequency"`
	VideoTopResponse      number `json:"video_top_response"` // |γ(f_top)/γ(0)|
	TangentialSensitivity number `json:"tangential_sensitivity"`
	TangentialDBm         number `json:"tangential_sensitivity_dbm"`
}

type noiseJSON struct {
	Circuit     string            `json:"circuit"`
	File        string            `json:"file"`
	Temperature number            `json:"temperature"`
	Input       *string           `json:"input"`
	Output      string            `json:"output"`
	OutputPort  bool              `json:"output_is_port"`
	Sources     []noiseSourceJSON `json:"sources"`
	Points      []noisePointJSON  `json:"points"`
	Band        *noiseBandJSON    `json:"band,omitempty"`
	Detector    *detectorJSON     `json:"detector,omitempty"`
}

func noiseDocument(s *noiseSetup, o *plan.NoiseRun) *noiseJSON {
	r := o.Result
	d := &noiseJSON{Circuit: s.c.Name, File: s.c.File, Temperature: number(r.TemperatureK), Output: s.plan.OutputName,
		OutputPort: r.Settings.Output.Port >= 0, Sources: []noiseSourceJSON{}, Points: []noisePointJSON{}}
	if r.Settings.Input >= 0 {
		name := s.plan.InputName
		d.Input = &name
	}
	for _, src := range r.Sources {
		j := noiseSourceJSON{Name: src.Name, Where: src.Where, Kind: string(src.Kind), Role: report.NoiseRole(r, src),
			White: number(src.White), Flicker: number(src.Flicker)}
		if src.Kind == ac.ThermalNoise {
			j.Temperature = number(src.TemperatureK)
		}
		d.Sources = append(d.Sources, j)
	}
	for i, pt := range r.Points {
		j := noisePointJSON{Frequency: number(pt.FrequencyHz), OutputDensity: number(pt.Density()), Gain: complexJSON(pt.Gain),
			Contributions: make([]number, len(pt.Contributions))}
		if r.Settings.Input >= 0 {
			j.InputReferred, j.NoiseFigureDB = ptr(pt.InputReferred()), ptr(pt.FigureDB())
		}
		if o.Detection != nil {
			j.NEP = ptr(o.NEP(i))
			j.VideoSensitivity = ptr(cmplx.Abs(o.Video[i]))
		}
		for k, c := range pt.Contributions {
			j.Contributions[k] = number(c)
		}
		d.Points = append(d.Points, j)
	}
	if b := o.Band; b != nil {
		j := &noiseBandJSON{From: number(b.FromHz), To: number(b.ToHz), OutputRMS: number(b.RMS()), PerDecade: b.PerDecade,
			Contributions: make([]number, len(b.Contributions))}
		if r.Settings.Input >= 0 {
			j.InputReferredRMS, j.AverageNoiseFigureDB = ptr(b.InputReferredRMS()), ptr(10*math.Log10(b.AverageFactor()))
		}
		for k, c := range b.Contributions {
			j.Contributions[k] = number(c)
		}
		d.Band = j
	}
	if det := o.Detection; det != nil {
		d.Detector = &detectorJSON{Carrier: number(det.CarrierHz), VoltageSensitivity: number(det.Sensitivity),
			VideoFrom: number(det.Video.FromHz), VideoTo: number(det.Video.ToHz), VideoNoiseRMS: number(det.Video.RMS()),
			NEP: number(det.NEP), NEPFrequency: number(det.SpotHz), VideoTopResponse: number(det.TopResponse), TangentialSensitivity: number(det.TangentialW), TangentialDBm: number(det.TangentialDBm())}
	}
	return d
}
