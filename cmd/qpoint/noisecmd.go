package main

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"qpoint/ac"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/diode"
	"qpoint/bias/si"
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
is not computed here.`,
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

// noiseSetup is a resolved noise run.
type noiseSetup struct {
	c        *circuit.Circuit
	p        *bias.Point
	nw       *smallsignal.Network
	settings ac.NoiseSettings
	inName   string // "" without an input port
	outName  string
	grid     []float64
	// videoBand is a detector's video band; band the integration band.
	videoBand [2]float64
	band      [2]float64
	hasBand   bool
	carrierHz float64
	detector  bool
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

// resolveNoiseFor resolves ports, bias, detector and frequencies for c.
// resolveNoiseFor resolves the flags and the file's defaults for a loaded
// circuit and linearises it at p, solving the bias first when p is nil.
func resolveNoiseFor(c *circuit.Circuit, fl *noiseFlags, p *bias.Point) (*noiseSetup, error) {
	s := &noiseSetup{c: c}
	def := c.Analysis.Distortion
	sp, err := resolveSignalPath(c, fl.input, fl.output)
	if err != nil {
		return nil, err
	}
	inIdx, in, o, out := sp.in, sp.inName, sp.out, sp.outName
	if o.Port >= 0 && o.Port == inIdx {
		if fl.input != "" {
			return nil, inputError(fmt.Errorf("flags --input and --output: both name port `%s`; the output must be another port or a node", in))
		}
		inIdx, in = -1, "" // a one-port circuit: output noise only
	}
	s.settings = ac.NoiseSettings{Input: inIdx, Output: o}
	s.inName, s.outName = in, out

	if fl.carrier != "" {
		v, err := circuit.ParseBounded(fl.carrier, circuit.Frequency)
		if err != nil {
			return nil, inputError(fmt.Errorf("flag --carrier: %w", err))
		}
		if err := ac.CheckFrequency(v); err != nil {
			return nil, inputError(fmt.Errorf("flag --carrier: %w", err))
		}
		s.carrierHz = v
	} else if def.Set {
		s.carrierHz = def.FrequencyHz
	}
	s.videoBand = [2]float64{defaultVideoFromHz, defaultVideoToHz}
	if fl.videoBandwidth != "" {
		lo, hi, err := parseBand("video-bandwidth", fl.videoBandwidth, defaultVideoFromHz)
		if err != nil {
			return nil, err
		}
		s.videoBand = [2]float64{lo, hi}
	}
	if fl.bandwidth != "" {
		lo, hi, err := parseBand("bandwidth", fl.bandwidth, 0)
		if err != nil {
			return nil, err
		}
		s.band, s.hasBand = [2]float64{lo, hi}, true
	}
	asked := fl.carrier != "" || fl.videoBandwidth != ""
	if asked && s.carrierHz == 0 {
		return nil, inputError(fmt.Errorf("flag --video-bandwidth: detector figures need the carrier frequency; give --carrier (e.g. 2.45GHz) or analysis.distortion.frequency in the file"))
	}
	if asked && inIdx < 0 {
		return nil, inputError(fmt.Errorf("flags --carrier/--video-bandwidth: detector figures need an input port for the carrier"))
	}

	if p == nil {
		if p, err = solveWithTemperature(c, fl.temperature); err != nil {
			return nil, err
		}
	}
	s.p = p
	s.nw, err = smallsignal.New(s.p)
	if err != nil {
		return nil, analysisError(err)
	}
	if s.carrierHz > 0 && inIdx >= 0 {
		_, err := ac.VoltageSensitivity(s.nw, s.settings, s.carrierHz)
		switch {
		case err == nil && asked:
			s.detector = true
		case err == nil:
			// Unasked, a detector is an output that carries more
			// rectified DC than carrier at a small level.
			s.detector = ac.Detects(s.nw, s.settings, s.carrierHz)
		case asked && errors.Is(err, ac.ErrNoRectification):
			return nil, inputError(fmt.Errorf("flags --carrier/--video-bandwidth: output %s is not a detector output: %w", out, err))
		case asked:
			return nil, analysisError(err)
		}
	}

	// The sweep: a detector's video band unless the flags say otherwise,
	// else the flags, the file's analysis.response, the defaults.
	if s.detector && fl.from == "" && fl.to == "" {
		if fl.perDecade != 0 && fl.points != 0 {
			return nil, inputError(fmt.Errorf("flags --per-decade and --points: give one grid, not both"))
		}
		if fl.points > 0 {
			s.grid, err = ac.LinearGrid(s.videoBand[0], s.videoBand[1], fl.points)
		} else {
			s.grid, err = ac.LogGrid(s.videoBand[0], s.videoBand[1], orDefault(fl.perDecade, defaultPerDecade))
		}
		if err != nil {
			return nil, inputError(fmt.Errorf("flags --per-decade/--points: %w", err))
		}
	} else {
		s.grid, err = sweepGrid(c, &responseFlags{from: fl.from, to: fl.to, perDecade: fl.perDecade, points: fl.points})
		if err != nil {
			return nil, err
		}
	}
	if n := len(s.grid); !s.hasBand && n > 1 && s.grid[n-1] > s.grid[0] {
		s.band, s.hasBand = [2]float64{s.grid[0], s.grid[n-1]}, true
	}
	return s, nil
}

// orDefault returns v, or d when v is zero.
func orDefault(v, d int) int {
	if v == 0 {
		return d
	}
	return v
}

// noiseOutcome is everything a noise run computed.
type noiseOutcome struct {
	s    *noiseSetup
	r    *ac.NoiseResult
	band *ac.NoiseBand // nil without a band
	det  *ac.Detection // nil unless a detector
	// video is a detector's sensitivity γ(f) at each point's frequency.
	video []complex128
}

// nep returns point i's noise-equivalent power v_n(f)/|γ(f)|.
func (o *noiseOutcome) nep(i int) float64 {
	return o.r.Points[i].Density() / cmplx.Abs(o.video[i])
}

func computeNoise(s *noiseSetup) (*noiseOutcome, error) {
	o := &noiseOutcome{s: s}
	var err error
	if o.r, err = ac.Noise(s.nw, s.grid, s.settings); err != nil {
		return nil, analysisError(err)
	}
	if s.hasBand {
		if o.band, err = ac.IntegrateNoise(s.nw, s.settings, s.band[0], s.band[1]); err != nil {
			return nil, analysisError(err)
		}
	}
	if s.detector {
		if o.det, err = ac.Detector(s.nw, s.settings, s.carrierHz, s.videoBand[0], s.videoBand[1]); err != nil {
			return nil, analysisError(err)
		}
		if o.video, err = ac.VideoSensitivity(s.nw, s.settings, s.carrierHz, s.grid); err != nil {
			return nil, analysisError(err)
		}
	}
	return o, nil
}

func runNoise(cmd *cobra.Command, path string, fl *noiseFlags) error {
	if fl.rows < 1 {
		return inputError(fmt.Errorf("flag --rows: %d; accepted: 1 or more", fl.rows))
	}
	c, err := loadCircuit(cmd.ErrOrStderr(), path, fl.sets, fl.temperature)
	if err != nil {
		return err
	}
	if err := checkOutputsEarly(fl.plotsDir, fl.csvPath); err != nil {
		return err
	}
	s, err := resolveNoiseFor(c, fl, nil)
	if err != nil {
		return err
	}
	o, err := computeNoise(s)
	if err != nil {
		return err
	}
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
		figs = noiseFigures(o.r)
		for _, tb := range tables {
			paths = append(paths, filepath.Join(fl.plotsDir, tb.name))
		}
		paths = append(paths, figurePaths(fl.plotsDir, figs)...)
	}
	// Every named output is checked before any is written.
	if err := refuseInputs(paths...); err != nil {
		return err
	}
	if fl.csvPath != "" {
		if err := writeFileAtomic(fl.csvPath, func(w io.Writer) error { return writeNoiseCSV(w, o) }); err != nil {
			return err
		}
	}
	if fl.plotsDir != "" {
		if err := os.MkdirAll(fl.plotsDir, 0o755); err != nil {
			return inputError(fmt.Errorf("flag --plots: %w", err))
		}
		for _, tb := range tables {
			if err := writeFileAtomic(filepath.Join(fl.plotsDir, tb.name), func(w io.Writer) error { return tb.write(w, o.r) }); err != nil {
				return err
			}
		}
		if err := writeFigures(fl.plotsDir, figs); err != nil {
			return err
		}
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		return writeJSON(out, noiseDocument(o))
	}
	writeNoiseHeader(out, s)
	noiseTable(o, fl.rows).write(out)
	for _, n := range noiseNotes(o) {
		fmt.Fprintf(out, "  %s\n", n)
	}
	if o.band != nil {
		bandTable(o).write(out)
		sourceTable(o).write(out)
	}
	if o.det != nil {
		t, notes := detectorTable(o)
		t.write(out)
		for _, n := range notes {
			fmt.Fprintf(out, "  %s\n", n)
		}
	}
	fmt.Fprintln(out)
	if fl.csvPath != "" {
		fmt.Fprintf(out, "CSV written to %s\n", fl.csvPath)
	}
	if fl.plotsDir != "" {
		fmt.Fprintf(out, "figures written to %s (noise-density, noise-contributions: SVG, PNG and CSV data)\n", fl.plotsDir)
	}
	return nil
}

// noiseFigures returns the noise figures of package plots: the output
// density against frequency, with the thermal floor sqrt(k T0 Z0) that a
// 290 K source behind a matched, noiseless network leaves across an output
// port's load, and each source's share of the output noise power, stacked.
func noiseFigures(r *ac.NoiseResult) []*plots.Figure {
	n := len(r.Points)
	freqs, dens := make([]float64, n), make([]float64, n)
	shares := make([][]float64, len(r.Sources))
	for k := range shares {
		shares[k] = make([]float64, n)
	}
	for i, pt := range r.Points {
		freqs[i], dens[i] = pt.FrequencyHz, pt.Density()
		for k, c := range pt.Contributions {
			shares[k][i] = c / pt.Total
		}
	}
	names := make([]string, len(r.Sources))
	for k, src := range r.Sources {
		names[k] = src.Label()
	}
	floor := 0.0
	if r.OutputImpedance > 0 {
		floor = math.Sqrt(diode.Boltzmann * ac.StandardNoiseTemperatureK * r.OutputImpedance)
	}
	return []*plots.Figure{plots.NoiseDensity(freqs, dens, "V/√Hz", floor), plots.NoiseContributions(freqs, names, shares)}
}

// temperatureText prints a noise temperature.
func temperatureText(k float64) string {
	if k == 0 {
		return "0 K (noiseless)"
	}
	return strconv.FormatFloat(k, 'f', -1, 64) + " K"
}

func writeNoiseHeader(w io.Writer, s *noiseSetup) {
	fmt.Fprintf(w, "%s\n", s.c.Name)
	fmt.Fprintf(w, "  file         %s\n", s.c.File)
	writeOverrides(w, s.c)
	fmt.Fprintf(w, "  bias         %s\n", report.BiasLine(s.p))
	for _, line := range noiseSetupLines(s) {
		fmt.Fprintf(w, "  %-12s %s\n", line[0], line[1])
	}
}

// noiseSetupLines describes input, output and sweep as label, text pairs.
func noiseSetupLines(s *noiseSetup) [][2]string {
	var lines [][2]string
	set := s.settings
	if set.Input >= 0 {
		p := s.nw.Ports[set.Input]
		t := ac.StandardNoiseTemperatureK * 1.0
		if cp := s.c.Ports[set.Input]; cp.NoiseTemperatureSet {
			t = cp.NoiseTemperatureK
		}
		text := fmt.Sprintf("port %s, %s source at %s", p.Name, si.Format(p.Impedance, "Ω", 4), temperatureText(t))
		if !s.detector {
			text += " as operated; at 290 K for the noise figure"
		}
		lines = append(lines, [2]string{"input", text})
	} else {
		lines = append(lines, [2]string{"input", "none: output noise only (no port to take as the signal source)"})
	}
	if set.Output.Port >= 0 {
		p := s.nw.Ports[set.Output.Port]
		t := ac.StandardNoiseTemperatureK * 1.0
		if cp := s.c.Ports[set.Output.Port]; cp.NoiseTemperatureSet {
			t = cp.NoiseTemperatureK
		}
		text := fmt.Sprintf("port %s, %s load at %s", p.Name, si.Format(p.Impedance, "Ω", 4), temperatureText(t))
		if s.settings.Input >= 0 && !s.detector {
			text += ": in the output noise, not in the noise figure"
		} else {
			text += ", counted in the output noise"
		}
		lines = append(lines, [2]string{"output", text})
	} else {
		lines = append(lines, [2]string{"output", "node " + set.Output.Node})
	}
	g := s.grid
	what := ""
	if s.detector && len(g) > 1 && g[0] == s.videoBand[0] && g[len(g)-1] == s.videoBand[1] {
		what = " (the video band)"
	}
	if len(g) == 1 {
		lines = append(lines, [2]string{"sweep", "1 point at " + si.Format(g[0], "Hz", 4)})
	} else {
		lines = append(lines, [2]string{"sweep", fmt.Sprintf("%d points, %s to %s%s", len(g), si.Format(g[0], "Hz", 4), si.Format(g[len(g)-1], "Hz", 4), what)})
	}
	return lines
}

// density prints a noise density.
func density(v float64, unit string) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	return si.Format(v, unit, 4)
}

func figureText(db float64) string {
	if math.IsNaN(db) {
		return "—"
	}
	if math.IsInf(db, 1) {
		return "∞"
	}
	if math.Abs(db) < 0.005 {
		db = 0 // no "-0.00"
	}
	return strconv.FormatFloat(db, 'f', 2, 64) + " dB"
}

func shareText(f float64) string {
	if math.IsNaN(f) {
		return "—"
	}
	return strconv.FormatFloat(100*f, 'f', 1, 64) + " %"
}

// largest returns the label and share of the largest of contributions.
func largest(sources []ac.NoiseSource, contributions []float64, total float64) string {
	k := 0
	for i, c := range contributions {
		if c > contributions[k] {
			k = i
		}
	}
	if len(contributions) == 0 || !(total > 0) {
		return "—"
	}
	return fmt.Sprintf("%s %s", sources[k].Label(), shareText(contributions[k]/total))
}

func noiseTable(o *noiseOutcome, rows int) *table {
	r := o.r
	hasInput := r.Settings.Input >= 0
	t := &table{title: "Noise at the output", header: []string{"frequency", "output noise"}}
	switch {
	case o.det != nil:
		t.header = append(t.header, "noise-equivalent power", "video response")
	case hasInput:
		t.header = append(t.header, "input-referred", "noise figure")
	}
	t.header = append(t.header, "largest source")
	for _, i := range report.PickRows(len(r.Points), rows) {
		pt := r.Points[i]
		cells := []string{si.Format(pt.FrequencyHz, "Hz", 4), density(pt.Density(), "V/√Hz")}
		switch {
		case o.det != nil:
			cells = append(cells, density(o.nep(i), "W/√Hz"), figureText(20*math.Log10(cmplx.Abs(o.video[i])/math.Abs(o.det.Sensitivity))))
		case hasInput:
			cells = append(cells, density(pt.InputReferred(), "V/√Hz"), figureText(pt.FigureDB()))
		}
		cells = append(cells, largest(r.Sources, pt.Contributions, pt.Total))
		t.add(cells...)
	}
	return t
}

func noiseNotes(o *noiseOutcome) []string {
	notes := []string{"output noise: every source as operated, each port's termination at its noise temperature"}
	if o.det != nil {
		notes = append(notes, "noise-equivalent power: output noise over the voltage sensitivity at that video frequency",
			"video response: that sensitivity relative to its DC value")
	} else if o.r.Settings.Input >= 0 {
		notes = append(notes, fmt.Sprintf("input-referred: the circuit's own noise as an EMF in series with port %s's generator", o.s.inName),
			"noise figure: source at 290 K, output load left out (IEEE); F = 1 + e_n²/(4 k 290 K Z0)")
	}
	return append(notes, "small-signal noise at the DC bias point: no large signal (a mixer's local oscillator) pumps the diodes")
}

func bandTable(o *noiseOutcome) *table {
	b := o.band
	t := &table{title: fmt.Sprintf("Integrated from %s to %s", si.Format(b.FromHz, "Hz", 4), si.Format(b.ToHz, "Hz", 4)), header: []string{"quantity", "value"}}
	t.add("output noise", si.Format(b.RMS(), "V", 4)+" rms")
	if o.r.Settings.Input >= 0 && o.det == nil {
		t.add("input-referred", si.Format(b.InputReferredRMS(), "V", 4)+" rms (EMF)")
		t.add("average noise figure", figureText(10*math.Log10(b.AverageFactor())))
	}
	t.add("integration grid", fmt.Sprintf("%d per decade, converged to %.0e", b.PerDecade, math.Max(b.Change, 1e-16)))
	return t
}

// role says what part a source plays for the noise figure.
func role(r *ac.NoiseResult, src ac.NoiseSource) string {
	switch {
	case src.Port >= 0 && src.Port == r.Settings.Input:
		return "signal source"
	case src.Port >= 0 && src.Port == r.Settings.Output.Port:
		return "load"
	case src.Port >= 0:
		return "other port"
	}
	return "circuit"
}

func sourceTable(o *noiseOutcome) *table {
	b := o.band
	t := &table{title: "Where the noise comes from (share of the integrated output noise power)",
		header: []string{"source", "role", "temperature", "output noise", "share"}}
	order := make([]int, len(b.Sources))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(i, j int) bool { return b.Contributions[order[i]] > b.Contributions[order[j]] })
	for _, k := range order {
		src := b.Sources[k]
		temp := "—"
		if src.Kind == ac.ThermalNoise {
			temp = temperatureText(src.TemperatureK)
		}
		rms := si.Format(math.Sqrt(b.Contributions[k]), "V", 4) + " rms"
		if b.Contributions[k] < 1e-24*b.Total {
			rms = "≈ 0" // balanced out, or no path to the output
		}
		t.add(src.Label(), role(o.r, src), temp, rms, shareText(b.Contributions[k]/b.Total))
	}
	return t
}

func detectorTable(o *noiseOutcome) (*table, []string) {
	d := o.det
	t := &table{title: "Detector sensitivity", header: []string{"quantity", "value"}}
	t.add("carrier", si.Format(d.CarrierHz, "Hz", 5))
	t.add("voltage sensitivity", fmt.Sprintf("%s (%s mV/µW)", si.Format(d.Sensitivity, "V/W", 4), strconv.FormatFloat(d.Sensitivity*1e-3, 'g', 4, 64)))
	t.add("video band", fmt.Sprintf("%s to %s", si.Format(d.Video.FromHz, "Hz", 4), si.Format(d.Video.ToHz, "Hz", 4)))
	t.add("video noise", si.Format(d.Video.RMS(), "V", 4)+" rms")
	t.add("noise-equivalent power", fmt.Sprintf("%s at %s", density(d.NEP, "W/√Hz"), si.Format(d.SpotHz, "Hz", 4)))
	t.add("tangential sensitivity", fmt.Sprintf("%.2f dBm (%s)", d.TangentialDBm(), si.Format(d.TangentialW, "W", 3)))
	notes := []string{
		fmt.Sprintf("voltage sensitivity γ: DC shift at %s per watt available from port %s, square-law limit (Volterra)", o.s.outName, o.s.inName),
		"NEP = v_n / |γ| at the band's geometric centre; tangential sensitivity = 2.5 V_n / |γ| with V_n the rms video noise,",
		"  a video signal-to-noise ratio of 8 dB (Cowley and Sorensen 1966)",
	}
	if r := d.TopResponse; r < math.Sqrt(0.5) {
		notes = append(notes, fmt.Sprintf("the video circuit passes %.1f dB of the signal at %s, the top of the video band: pulses that need",
			20*math.Log10(r), si.Format(d.Video.ToHz, "Hz", 4)),
			"  the whole band will not reach full height; narrow --video-bandwidth or speed up the video circuit")
	}
	return t, notes
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
func writeNoiseCSV(w io.Writer, o *noiseOutcome) error {
	r := o.r
	cw := csv.NewWriter(w)
	header := []string{"frequency_Hz", "output_noise_V_per_rtHz", "input_referred_V_per_rtHz", "noise_figure_dB"}
	if o.det != nil {
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
		if o.det != nil {
			row = append(row, csvNumber(o.nep(i)))
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

func noiseDocument(o *noiseOutcome) *noiseJSON {
	r, s := o.r, o.s
	d := &noiseJSON{Circuit: s.c.Name, File: s.c.File, Temperature: number(r.TemperatureK), Output: s.outName,
		OutputPort: r.Settings.Output.Port >= 0, Sources: []noiseSourceJSON{}, Points: []noisePointJSON{}}
	if r.Settings.Input >= 0 {
		name := s.inName
		d.Input = &name
	}
	for _, src := range r.Sources {
		j := noiseSourceJSON{Name: src.Name, Where: src.Where, Kind: string(src.Kind), Role: role(r, src),
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
		if o.det != nil {
			j.NEP = ptr(o.nep(i))
			j.VideoSensitivity = ptr(cmplx.Abs(o.video[i]))
		}
		for k, c := range pt.Contributions {
			j.Contributions[k] = number(c)
		}
		d.Points = append(d.Points, j)
	}
	if b := o.band; b != nil {
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
	if det := o.det; det != nil {
		d.Detector = &detectorJSON{Carrier: number(det.CarrierHz), VoltageSensitivity: number(det.Sensitivity),
			VideoFrom: number(det.Video.FromHz), VideoTo: number(det.Video.ToHz), VideoNoiseRMS: number(det.Video.RMS()),
			NEP: number(det.NEP), NEPFrequency: number(det.SpotHz), VideoTopResponse: number(det.TopResponse), TangentialSensitivity: number(det.TangentialW), TangentialDBm: number(det.TangentialDBm())}
	}
	return d
}

// noiseSection is the noise part of the design report: the file's
// defaults, the tables of the command, and headline cards (the noise
// figure at the file's carrier, or a detector's NEP and tangential
// sensitivity). A circuit without ports gets a section that says so.
func noiseSection(c *circuit.Circuit, temperature string, p *bias.Point) (report.Section, []report.Card, error) {
	sec := report.Section{ID: "noise", Title: "Noise"}
	if len(c.Ports) == 0 {
		sec.Intro = "The circuit has no ports, so no noise is shown."
		return sec, nil, nil
	}
	s, err := resolveNoiseFor(c, &noiseFlags{temperature: temperature}, p)
	if err != nil {
		sec.Intro = "The noise analysis could not be set up: " + err.Error()
		return sec, nil, nil
	}
	o, err := computeNoise(s)
	if err != nil {
		return sec, nil, err
	}
	var intro []string
	for _, l := range noiseSetupLines(s) {
		intro = append(intro, l[0]+": "+l[1])
	}
	sec.Intro = strings.Join(intro, "; ") + "."
	for _, f := range noiseFigures(o.r) {
		fig, err := svgOf(f)
		if err != nil {
			return sec, nil, analysisError(err)
		}
		sec.Blocks = append(sec.Blocks, report.Block{Figure: fig})
	}
	sec.Blocks = append(sec.Blocks, report.Block{Table: noiseTable(o, 9).report()})
	sec.Blocks = append(sec.Blocks, report.Block{Note: strings.Join(noiseNotes(o), "; ") + "."})
	if o.band != nil {
		sec.Blocks = append(sec.Blocks, report.Block{Table: bandTable(o).report()}, report.Block{Table: sourceTable(o).report()})
	}
	var cards []report.Card
	if o.det != nil {
		t, notes := detectorTable(o)
		sec.Blocks = append(sec.Blocks, report.Block{Table: t.report()}, report.Block{Note: strings.Join(notes, "; ") + "."})
		cards = append(cards,
			report.Card{Label: "noise-equivalent power", Value: density(o.det.NEP, "W/√Hz"), Detail: fmt.Sprintf("at %s video frequency", si.Format(o.det.SpotHz, "Hz", 3))},
			report.Card{Label: "tangential sensitivity", Value: fmt.Sprintf("%.1f dBm", o.det.TangentialDBm()), Detail: fmt.Sprintf("at %s, video to %s", si.Format(o.det.CarrierHz, "Hz", 4), si.Format(o.det.Video.ToHz, "Hz", 3))})
	} else if s.settings.Input >= 0 && s.carrierHz > 0 {
		at, err := ac.Noise(s.nw, []float64{s.carrierHz}, s.settings)
		if err == nil {
			cards = append(cards, report.Card{Label: "noise figure", Value: figureText(at.Points[0].FigureDB()),
				Detail: fmt.Sprintf("%s → %s at %s, source at 290 K", s.inName, s.outName, si.Format(s.carrierHz, "Hz", 4))})
		}
	}
	return sec, cards, nil
}
