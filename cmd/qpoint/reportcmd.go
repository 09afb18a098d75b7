package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"strings"

	"github.com/spf13/cobra"

	"qpoint/ac"
	"qpoint/ac/study"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
	"qpoint/plots"
	"qpoint/plots/report"
	"qpoint/smallsignal"
)

func newReportCmd() *cobra.Command {
	var outPath, temperature string
	var sets []string
	cmd := &cobra.Command{
		Use:   "report FILE -o REPORT.html",
		Short: "Write one self-contained HTML design report",
		Long: `report runs every analysis the circuit file's defaults ask for — bias,
small-signal response, distortion, the study, a mixer under its LO and a
pulse — and writes one HTML page with the circuit summary, Q-point and
small-signal tables, response figures (gain and phase, impedance, Smith
chart, group delay), distortion tables and figures, the study's figures,
the mixer's figures against its LO drive and every caution. The page carries its figures
inline and fetches nothing: mail it, archive it, print it.`,
		Example: `  qpoint report testdata/demo/detector.yaml -o detector.html
  qpoint report mixer.yaml -o mixer-85C.html --temperature 85C`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			if outPath == "" {
				return inputError(fmt.Errorf("flag -o is missing: name the HTML file to write, e.g. -o report.html"))
			}
			c, err := loadCircuit(cmd.ErrOrStderr(), args[0], sets, temperature)
			if err != nil {
				return err
			}
			if err := checkOutputsEarly("", outPath); err != nil {
				return err
			}
			doc, err := buildReport(c, temperature)
			if err != nil {
				return err
			}
			if err := writeFileAtomic(outPath, func(w io.Writer) error { return report.Write(w, doc) }); err != nil {
				return err
			}
			fmt.Fprintf(cmd.OutOrStdout(), "report written to %s\n", outPath)
			return nil
		},
	}
	cmd.Flags().StringVarP(&outPath, "output", "o", "", "the HTML file to write")
	cmd.Flags().StringVar(&temperature, "temperature", "", "circuit temperature, overriding the file's (e.g. 85C)")
	addSetFlag(cmd, &sets)
	return cmd
}

func svgOf(f *plots.Figure) (*report.Figure, error) {
	var b bytes.Buffer
	if err := plots.Write(&b, "svg", f); err != nil {
		return nil, err
	}
	return &report.Figure{SVG: b.Bytes()}, nil
}

// buildReport runs the analyses of the file's defaults and lays out the
// report.
func buildReport(c *circuit.Circuit, temperature string) (*report.Document, error) {
	p, err := solveWithTemperature(c, temperature)
	if err != nil {
		return nil, err
	}
	doc := &report.Document{
		Title:    c.Name,
		Subtitle: fmt.Sprintf("%s · %.2f °C · bias by %s in %s", c.File, report.Celsius(p.TemperatureK), p.Stats.Strategy, report.Plural(p.Stats.Iterations, "iteration")),
		Footer: []string{
			"Results are model estimates from the diode models in the circuit file. Confirm them by measurement before relying on them; the parts' ratings and your local practice govern.",
			"Written by qpoint.",
		},
	}
	if l := overridesLine(c); l != "" {
		doc.Subtitle += " · values set for this run: " + l
	}
	for _, x := range c.Warnings {
		doc.Cautions = append(doc.Cautions, fmt.Sprintf("line %d of the file: %s", x.Line, x.Message))
	}
	for _, w := range p.Warnings {
		doc.Cautions = append(doc.Cautions, w.Part+": "+w.Message)
	}
	doc.Cards = append(doc.Cards, biasCards(p)...)

	// Circuit summary.
	parts := &table{title: "Parts", header: []string{"name", "type", "terminals", "value / model"}}
	for _, pt := range c.Parts {
		val := pt.Model
		if pt.Kind != circuit.Diode {
			val = si.Format(pt.Value, map[circuit.Kind]string{circuit.Resistor: "Ω", circuit.Capacitor: "F", circuit.Inductor: "H", circuit.VoltageSource: "V", circuit.CurrentSource: "A"}[pt.Kind], 4)
		}
		parts.add(pt.Name, strings.ReplaceAll(pt.Kind.String(), "_", " "), pt.Nodes[0]+" → "+pt.Nodes[1], val)
	}
	models := &table{title: "Diode models", header: []string{"model", "I_S", "n", "R_S", "C_j0", "V_bi", "m", "τ_T", "breakdown"}}
	for _, name := range c.ModelOrder {
		m := c.Models[name].Params
		knee := "none"
		if m.BreakdownVoltage > 0 {
			knee = si.Format(m.BreakdownVoltage, "V", 3) + " at " + si.Format(m.BreakdownCurrent, "A", 3)
		}
		models.add(name, si.Format(m.SaturationCurrent, "A", 3), fmt.Sprintf("%.3g", m.Ideality), si.Format(m.SeriesResistance, "Ω", 3),
			si.Format(m.ZeroBiasCapacitance, "F", 3), si.Format(m.BuiltInPotential, "V", 3), fmt.Sprintf("%.3g", m.Grading), si.Format(m.TransitTime, "s", 3), knee)
	}
	ports := &table{title: "Ports", header: []string{"port", "node", "return", "impedance", "coupling"}}
	for _, pt := range c.Ports {
		coupling := "DC"
		if pt.ACCoupled {
			coupling = "AC (DC-blocked)"
		}
		ports.add(pt.Name, pt.Node, pt.Return, si.Format(pt.Impedance, "Ω", 4), coupling)
	}
	sec := report.Section{ID: "circuit", Title: "Circuit", Intro: fmt.Sprintf("%d parts, %d diode models, %d ports.", len(c.Parts), len(c.Models), len(c.Ports))}
	for _, t := range []*table{parts, models, ports} {
		sec.Blocks = append(sec.Blocks, report.Block{Table: t.report()})
	}
	doc.Sections = append(doc.Sections, sec)

	// Operating point.
	sec = report.Section{ID: "bias", Title: "Operating point", Intro: fmt.Sprintf("Solved by %s in %s; largest current imbalance %s.",
		p.Stats.Strategy, report.Plural(p.Stats.Iterations, "iteration"), si.Format(p.Stats.Residual, "A", 2))}
	for _, t := range report.BiasTables(p) {
		sec.Blocks = append(sec.Blocks, report.Block{Table: t})
	}
	doc.Sections = append(doc.Sections, sec)

	nw, err := smallsignal.New(p)
	if err != nil {
		return nil, analysisError(err)
	}
	ssm := &table{title: "Small-signal model at the Q point", header: []string{"diode", "g_d", "r_d", "R_S", "C_j", "C_d", "g2", "g3", "c2", "c3"}}
	for _, d := range nw.Diodes {
		ssm.add(d.Name, si.Format(d.G1, "S", 4), si.Format(1/d.G1, "Ω", 4), si.Format(d.SeriesResistance, "Ω", 3), si.Format(d.JunctionCapacitance, "F", 4),
			si.Format(d.DiffusionCapacitance, "F", 4), si.Format(d.G2, "A/V²", 3), si.Format(d.G3, "A/V³", 3), si.Format(d.C2, "F/V", 3), si.Format(d.C3, "F/V²", 3))
	}
	doc.Sections = append(doc.Sections, report.Section{ID: "model", Title: "Small-signal model",
		Intro:  "Each diode is its junction conductance g_d in parallel with C_j + C_d, behind R_S. g2, g3, c2, c3 are the Taylor coefficients of junction current and charge that set its distortion.",
		Blocks: []report.Block{{Table: ssm.report()}}})

	if len(c.Ports) == 0 {
		doc.Sections = append(doc.Sections, report.Section{ID: "signal", Title: "Signal analyses", Intro: "The circuit has no ports, so no response, distortion or study is shown."})
		return doc, nil
	}

	// Response.
	grid, err := sweepGrid(c, &responseFlags{})
	if err != nil {
		return nil, err
	}
	r, err := ac.Run(nw, grid, ac.Settings{})
	if err != nil {
		return nil, analysisError(err)
	}
	sec = report.Section{ID: "response", Title: "Small-signal response", Intro: fmt.Sprintf("%d points from %s to %s; every port terminated in its reference impedance.",
		len(r.Points), si.Format(grid[0], "Hz", 4), si.Format(grid[len(grid)-1], "Hz", 4))}
	for _, f := range plots.ResponseFigures(r, designFrequency(c)) {
		fig, err := svgOf(f)
		if err != nil {
			return nil, analysisError(err)
		}
		sec.Blocks = append(sec.Blocks, report.Block{Figure: fig})
	}
	sec.Blocks = append(sec.Blocks, report.Block{Table: report.ResponseTable(r, 9)})
	doc.Sections = append(doc.Sections, sec)

	// Distortion.
	ds, err := resolveDistortionFor(c, &distortionFlags{temperature: temperature}, p)
	if err == nil {
		sec, cards, err := distortionSection(ds)
		if err != nil {
			return nil, err
		}
		doc.Sections = append(doc.Sections, sec)
		doc.Cards = append(doc.Cards, cards...)
	}

	// Noise.
	if nsec, ncards, err := noiseSection(c, temperature, p); err == nil {
		doc.Sections = append(doc.Sections, nsec)
		if !c.Analysis.Mixer.Set { // a mixer's noise figure is the pumped one
			doc.Cards = append(doc.Cards, ncards...)
		}
	} else {
		doc.Sections = append(doc.Sections, report.Section{ID: "noise", Title: "Noise", Intro: "The noise analysis could not run: " + err.Error()})
	}

	// Study.
	if c.Analysis.Study.Set {
		sec, err := studySection(c)
		if err != nil {
			return nil, err
		}
		doc.Sections = append(doc.Sections, sec)
	}
	if len(c.Tolerances) > 0 {
		sec, cards, err := yieldSection(c, temperature) // yieldcmd.go
		if err != nil {
			return nil, err
		}
		doc.Sections = append(doc.Sections, sec)
		doc.Cards = append(doc.Cards, cards...)
	}

	// Mixer, only when the file asks for one (mixercmd.go).
	if c.Analysis.Mixer.Set {
		sec, cards, err := mixerSection(c, temperature, p)
		if err != nil {
			return nil, err
		}
		doc.Sections = append(doc.Sections, sec)
		doc.Cards = append(doc.Cards, cards...)
	}

	// Pulse, only when the file asks for one.
	if c.Analysis.Pulse.Set {
		sec, cards, err := pulseSection(c, temperature, p)
		if err != nil {
			return nil, err
		}
		doc.Sections = append(doc.Sections, sec)
		doc.Cards = append(doc.Cards, cards...)
	}
	return doc, nil
}

func distortionSection(s *distortionSetup) (report.Section, []report.Card, error) {
	sec := report.Section{ID: "distortion", Title: "Distortion",
		Intro: fmt.Sprintf("Port %s driven at %s, %.1f dBm available; output at %s.", s.inName, si.Format(s.drive.FrequencyHz, "Hz", 5), s.levelDBm, s.outName)}
	var cards []report.Card
	est, err := ac.Volterra(s.nw, s.drive)
	if err != nil {
		return sec, nil, analysisError(err)
	}
	t, notes := estimateTable(est)
	sec.Blocks = append(sec.Blocks, report.Block{Table: t.report()})
	for _, n := range notes {
		sec.Blocks = append(sec.Blocks, report.Block{Note: n})
	}
	sec.Blocks = append(sec.Blocks, report.Block{Table: contributionTable(est).report()})
	one := s.drive
	one.SecondToneHz = 0
	oneEst := est.OneTone()
	settings := ac.SteadySettings{Harmonics: 5}
	st, err := ac.SteadyState(s.nw, one, settings)
	if err != nil {
		sec.Blocks = append(sec.Blocks, report.Block{Note: "The waveform solve did not converge at this level: " + err.Error()})
		return sec, cards, nil
	}
	wt, note := waveformTable(st)
	sec.Blocks = append(sec.Blocks, report.Block{Table: wt.report()}, report.Block{Note: note}, report.Block{Table: stressTable(st).report()})
	for _, c := range st.Cautions() {
		cards = append(cards, report.Card{Label: "caution", Value: "overstress", Detail: c})
	}
	limit, lerr := ac.ValidityLimit(s.nw, one, s.levelDBm-40, s.levelDBm+40, 0.5, settings)
	if lerr != nil {
		limit = nil
		sec.Blocks = append(sec.Blocks, report.Block{Note: "The validity limit could not be searched: " + lerr.Error()})
	}
	ct, cnote := comparisonTable(ac.Compare(oneEst, st), limit)
	sec.Blocks = append(sec.Blocks, report.Block{Table: ct.report()})
	if cnote != "" {
		sec.Blocks = append(sec.Blocks, report.Block{Note: cnote})
	}
	// A level sweep around the chosen level for the figures.
	var levels []float64
	for l := s.levelDBm - 30; l <= s.levelDBm+20+1e-9; l += 2 {
		levels = append(levels, l)
	}
	sweep, _ := ac.LevelSweep(s.nw, one, levels, settings, nil)
	if cs := sweepCautions(sweep); len(cs) > 0 {
		sec.Blocks = append(sec.Blocks, report.Block{Note: "Over the level sweep: " + strings.Join(cs, "; ") + "."})
	}
	comp, compressed := 0.0, false
	if len(sweep) > 1 {
		comp, compressed = ac.Compression(sweep, cmplx.Abs(oneEst.Linear)/oneEst.Drive.EMF)
	}
	for _, f := range distortionFigures(oneEst, st, sweep, comp, compressed) {
		fig, err := svgOf(f)
		if err != nil {
			return sec, nil, analysisError(err)
		}
		sec.Blocks = append(sec.Blocks, report.Block{Figure: fig})
	}
	if !est.Balanced(ac.HD2) {
		cards = append(cards, report.Card{Label: "second harmonic", Value: fmt.Sprintf("%.1f dBc", est.HD2dBc()), Detail: fmt.Sprintf("at %.0f dBm, %s", s.levelDBm, si.Format(s.drive.FrequencyHz, "Hz", 4))})
	}
	if limit != nil {
		switch limit.Outcome {
		case ac.LimitFound:
			cards = append(cards, report.Card{Label: "small-signal limit", Value: fmt.Sprintf("%.1f dBm", limit.LevelDBm), Detail: "estimates within 0.5 dB of the waveform"})
		case ac.HeldThroughout:
			cards = append(cards, report.Card{Label: "small-signal limit", Value: fmt.Sprintf("above %.1f dBm", limit.LevelDBm), Detail: "estimates within 0.5 dB at every level tried"})
		default:
			cards = append(cards, report.Card{Label: "small-signal limit", Value: "not found", Detail: limit.Note()})
		}
	}
	if compressed {
		cards = append(cards, report.Card{Label: "1 dB compression", Value: fmt.Sprintf("%.1f dBm", comp), Detail: "input, from the waveform"})
	}
	// A detector's transfer curve, from below its tangential
	// sensitivity to beyond square law.
	path := ac.NoiseSettings{Input: s.drive.Input, Output: s.drive.Output}
	if ac.Detects(s.nw, path, s.drive.FrequencyHz) {
		if det, err := ac.Detector(s.nw, path, s.drive.FrequencyHz, defaultVideoFromHz, defaultVideoToHz); err == nil {
			var levels []float64
			for l := math.Floor(det.TangentialDBm()/2)*2 - 10; l <= 10+1e-9; l += 2 {
				levels = append(levels, l)
			}
			tsweep, _ := ac.LevelSweep(s.nw, one, levels, settings, nil)
			if t, err := ac.DetectorTransfer(tsweep, det.Sensitivity); err == nil {
				fig, err := svgOf(plots.DetectorTransfer(t, det.TangentialDBm()))
				if err != nil {
					return sec, nil, analysisError(err)
				}
				sec.Blocks = append(sec.Blocks, report.Block{Note: "Detector transfer curve, from the waveform at each level, with the tangential sensitivity over a 1 Hz to 2 MHz video band."},
					report.Block{Figure: fig})
				if !math.IsNaN(t.DeviationDBm) {
					cards = append(cards, report.Card{Label: "square-law range", Value: fmt.Sprintf("%.1f dB", t.DynamicRangeDB(det.TangentialDBm())),
						Detail: fmt.Sprintf("tangential sensitivity %.1f dBm to 1 dB deviation at %.1f dBm", det.TangentialDBm(), t.DeviationDBm)})
				}
			}
		}
	}
	return sec, cards, nil
}

func studySection(c *circuit.Circuit) (report.Section, error) {
	fl := &studyFlags{}
	s, err := resolveStudyFor(c, fl)
	sec := report.Section{ID: "study", Title: "Study"}
	if err != nil {
		sec.Intro = "The file's study could not be set up: " + err.Error()
		return sec, nil
	}
	r, err := study.Run(c, s.settings)
	if err != nil {
		return sec, analysisError(err)
	}
	sec.Intro = fmt.Sprintf("%s from %s to %s in %d steps (%d Newton iterations with continuation).", r.Settings.Axis.Vary.Text,
		report.FormatCell(r.Settings.Axis.Values[0], r.Settings.Axis.Vary.Quantity.Unit()), report.FormatCell(r.Settings.Axis.Values[len(r.Settings.Axis.Values)-1], r.Settings.Axis.Vary.Quantity.Unit()),
		len(r.Steps), r.Newton)
	for _, f := range studyFigures(r, "") {
		fig, err := svgOf(f)
		if err != nil {
			return sec, analysisError(err)
		}
		sec.Blocks = append(sec.Blocks, report.Block{Figure: fig})
	}
	cols := report.StudyColumns(r)
	t := report.StudyTable(r, cols)
	// Keep the report's table readable: at most a dozen rows.
	if n := len(t.Rows); n > 12 {
		var rows [][]string
		for k := 0; k < 12; k++ {
			rows = append(rows, t.Rows[int(math.Round(float64(k)*float64(n-1)/11))])
		}
		t.Rows = rows
		t.Caption = fmt.Sprintf("Study (12 of %d steps)", n)
	}
	sec.Blocks = append(sec.Blocks, report.Block{Table: t})
	return sec, nil
}

// biasCards returns the report's headline cards for the diodes' bias: one
// per diode, or for more than report.MaxListedDiodes one card with their count and
// current range (the operating-point section lists them all).
func biasCards(p *bias.Point) []report.Card {
	if len(p.Diodes) <= report.MaxListedDiodes {
		var cards []report.Card
		for _, d := range p.Diodes {
			cards = append(cards, report.Card{Label: d.Name + " bias", Value: si.Format(d.Current, "A", 3),
				Detail: fmt.Sprintf("r_d %s, C_j %s", si.Format(d.DynamicResistance, "Ω", 3), si.Format(d.JunctionCapacitance, "F", 3))})
		}
		return cards
	}
	lo, hi := report.CurrentRange(p.Diodes)
	least, most := si.Format(lo.Current, "A", 3), si.Format(hi.Current, "A", 3)
	card := report.Card{Label: fmt.Sprintf("bias of %d diodes", len(p.Diodes)), Value: least,
		Detail: "each; the operating point lists them"}
	if least != most {
		card.Value = least + " to " + most
		card.Detail = fmt.Sprintf("%s to %s; the operating point lists them all", lo.Name, hi.Name)
	}
	return []report.Card{card}
}
