package report

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"qpoint/ac"
	"qpoint/ac/mixer"
	"qpoint/ac/plan"
	"qpoint/ac/steady"
	"qpoint/ac/study"
	"qpoint/ac/transient"
	"qpoint/ac/yield"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
	"qpoint/plots"
	"qpoint/smallsignal"
)

// OverridesLine lists the --set values a run applied, or "" for none.
func OverridesLine(c *circuit.Circuit) string {
	var parts []string
	for _, o := range c.Overrides {
		parts = append(parts, o.String())
	}
	return strings.Join(parts, ", ")
}

// SweepCautions returns, for each diode and kind of overstress met in a
// level sweep, the lowest level at which it appears.
func SweepCautions(pts []steady.LevelPoint) []string {
	type key struct {
		diode string
		kind  steady.StressKind
	}
	seen := map[key]bool{}
	var out []string
	for _, p := range pts {
		for _, c := range p.Steady.StressCautions() {
			k := key{c.Diode, c.Kind}
			if seen[k] {
				continue
			}
			seen[k] = true
			out = append(out, fmt.Sprintf("from %.1f dBm: %s", p.LevelDBm, c.Message))
		}
	}
	return out
}

// SVGOf renders f as an SVG figure for the page.
func SVGOf(f *plots.Figure) (*Figure, error) {
	var b bytes.Buffer
	if err := plots.Write(&b, "svg", f); err != nil {
		return nil, err
	}
	return &Figure{SVG: b.Bytes()}, nil
}

// Settings choose what a report covers beyond the circuit file's own
// analysis defaults.
type Settings struct {
	// TemperatureK solves the circuit at this temperature instead of the
	// file's; zero keeps the file's.
	TemperatureK float64
}

// Build solves the circuit, runs every analysis its file asks for through
// the plan (ac/plan), the same defaults every front end takes, and lays
// the results out as a report: the circuit, its operating point and
// small-signal model, the response, distortion, noise, and, where the
// file has them, the study, the yield and the pulse. It fails only when
// the bias cannot be solved or an analysis breaks; an analysis the file
// cannot set up is reported in its section.
func Build(c *circuit.Circuit, settings Settings) (*Document, error) {
	p, err := bias.Solve(c, bias.Settings{TemperatureK: settings.TemperatureK})
	if err != nil {
		return nil, err
	}
	doc := &Document{
		Point:    p,
		Title:    c.Name,
		Subtitle: fmt.Sprintf("%s · %.2f °C · bias by %s in %s", c.File, Celsius(p.TemperatureK), p.Stats.Strategy, Plural(p.Stats.Iterations, "iteration")),
		Footer: []string{
			"Results are model estimates from the diode models in the circuit file. Confirm them by measurement before relying on them; the parts' ratings and your local practice govern.",
			"Written by qpoint.",
		},
	}
	if l := OverridesLine(c); l != "" {
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
	parts := &Table{Caption: "Parts", Header: []string{"name", "type", "terminals", "value / model"}}
	for _, pt := range c.Parts {
		val := pt.Model
		if pt.Kind != circuit.Diode {
			val = si.Format(pt.Value, map[circuit.Kind]string{circuit.Resistor: "Ω", circuit.Capacitor: "F", circuit.Inductor: "H", circuit.VoltageSource: "V", circuit.CurrentSource: "A"}[pt.Kind], 4)
		}
		parts.Add(pt.Name, strings.ReplaceAll(pt.Kind.String(), "_", " "), pt.Nodes[0]+" → "+pt.Nodes[1], val)
	}
	models := &Table{Caption: "Diode models", Header: []string{"model", "I_S", "n", "R_S", "C_j0", "V_bi", "m", "τ_T", "breakdown"}}
	for _, name := range c.ModelOrder {
		m := c.Models[name].Params
		knee := "none"
		if m.BreakdownVoltage > 0 {
			knee = si.Format(m.BreakdownVoltage, "V", 3) + " at " + si.Format(m.BreakdownCurrent, "A", 3)
		}
		models.Add(name, si.Format(m.SaturationCurrent, "A", 3), fmt.Sprintf("%.3g", m.Ideality), si.Format(m.SeriesResistance, "Ω", 3),
			si.Format(m.ZeroBiasCapacitance, "F", 3), si.Format(m.BuiltInPotential, "V", 3), fmt.Sprintf("%.3g", m.Grading), si.Format(m.TransitTime, "s", 3), knee)
	}
	for _, lp := range LineParts(c, plan.DesignFrequency(c)) {
		val := si.Format(lp.Impedance, "Ω", 4) + ", " + si.Format(lp.Delay, "s", 4)
		if lp.File != "" {
			val = lp.File
		}
		parts.Add(lp.Name, strings.ReplaceAll(lp.Type, "_", " "), lp.Between, val)
	}
	ports := &Table{Caption: "Ports", Header: []string{"port", "node", "return", "impedance", "coupling"}}
	for _, pt := range c.Ports {
		coupling := "DC"
		if pt.ACCoupled {
			coupling = "AC (DC-blocked)"
		}
		ports.Add(pt.Name, pt.Node, pt.Return, si.Format(pt.Impedance, "Ω", 4), coupling)
	}
	sec := Section{ID: "circuit", Title: "Circuit", Intro: fmt.Sprintf("%d parts, %d diode models, %d ports.", len(c.Parts)+len(c.Distributed), len(c.Models), len(c.Ports))}
	for _, t := range []*Table{parts, models, ports} {
		sec.Blocks = append(sec.Blocks, Block{Table: t})
	}
	doc.Sections = append(doc.Sections, sec)

	// Operating point.
	sec = Section{ID: "bias", Title: "Operating point", Intro: fmt.Sprintf("Solved by %s in %s; largest current imbalance %s.",
		p.Stats.Strategy, Plural(p.Stats.Iterations, "iteration"), si.Format(p.Stats.Residual, "A", 2))}
	for _, t := range BiasTables(p) {
		sec.Blocks = append(sec.Blocks, Block{Table: t})
	}
	if t := LineTable(LineParts(c, plan.DesignFrequency(c)), p); t != nil {
		sec.Blocks = append(sec.Blocks, Block{Table: t})
	}
	doc.Sections = append(doc.Sections, sec)

	nw, err := smallsignal.New(p)
	if err != nil {
		return nil, err
	}
	ssm := &Table{Caption: "Small-signal model at the Q point", Header: []string{"diode", "g_d", "r_d", "R_S", "C_j", "C_d", "g2", "g3", "c2", "c3"}}
	for _, d := range nw.Diodes {
		ssm.Add(d.Name, si.Format(d.G1, "S", 4), si.Format(1/d.G1, "Ω", 4), si.Format(d.SeriesResistance, "Ω", 3), si.Format(d.JunctionCapacitance, "F", 4),
			si.Format(d.DiffusionCapacitance, "F", 4), si.Format(d.G2, "A/V²", 3), si.Format(d.G3, "A/V³", 3), si.Format(d.C2, "F/V", 3), si.Format(d.C3, "F/V²", 3))
	}
	doc.Sections = append(doc.Sections, Section{ID: "model", Title: "Small-signal model",
		Intro:  "Each diode is its junction conductance g_d in parallel with C_j + C_d, behind R_S. g2, g3, c2, c3 are the Taylor coefficients of junction current and charge that set its distortion.",
		Blocks: []Block{{Table: ssm}}})

	if len(c.Ports) == 0 {
		doc.Sections = append(doc.Sections, Section{ID: "signal", Title: "Signal analyses", Intro: "The circuit has no ports, so no response, distortion or study is shown."})
		return doc, nil
	}

	// Response.
	grid, err := plan.ResponseGrid(c, plan.Grid{})
	if err != nil {
		return nil, err
	}
	r, err := ac.Run(nw, grid, ac.Settings{})
	if err != nil {
		return nil, err
	}
	doc.Response = r
	for _, o := range r.Outside {
		doc.Cautions = append(doc.Cautions, o.Message())
	}
	sec = Section{ID: "response", Title: "Small-signal response", Intro: fmt.Sprintf("%d points from %s to %s; every port terminated in its reference impedance.",
		len(r.Points), si.Format(grid[0], "Hz", 4), si.Format(grid[len(grid)-1], "Hz", 4))}
	for _, f := range plots.ResponseFigures(r, plan.DesignFrequency(c)) {
		fig, err := SVGOf(f)
		if err != nil {
			return nil, err
		}
		sec.Blocks = append(sec.Blocks, Block{Figure: fig})
	}
	sec.Blocks = append(sec.Blocks, Block{Table: ResponseTable(r, 9)})
	doc.Sections = append(doc.Sections, sec)

	// Distortion: its waveforms run on one core, so they run beside the
	// sections after it (whose studies and sweeps take what cores there
	// are) and take their place in the document when done. The analyses
	// only read nw.
	type distortionDone struct {
		sec   Section
		cards []Card
		err   error
	}
	distortion := make(chan distortionDone, 1)
	at := len(doc.Sections)
	if d, err := plan.ResolveDrive(c, plan.DriveRequest{}); err == nil {
		go func() {
			sec, cards, err := distortionSection(nw, d)
			distortion <- distortionDone{sec, cards, err}
			close(distortion)
		}()
	} else {
		close(distortion)
	}
	cardsAt := len(doc.Cards)
	defer func() {
		// Wait for it on every return, so that no analysis outlives Build.
		for range distortion {
		}
	}()

	// Noise.
	if nsec, ncards, err := noiseSection(c, nw); err == nil {
		doc.Sections = append(doc.Sections, nsec)
		if !c.Analysis.Mixer.Set { // a mixer's noise figure is the pumped one
			doc.Cards = append(doc.Cards, ncards...)
		}
	} else {
		doc.Sections = append(doc.Sections, Section{ID: "noise", Title: "Noise", Intro: "The noise analysis could not run: " + err.Error()})
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
		sec, cards, err := yieldSection(c, settings.TemperatureK)
		if err != nil {
			return nil, err
		}
		doc.Sections = append(doc.Sections, sec)
		doc.Cards = append(doc.Cards, cards...)
	}

	// Mixer, only when the file asks for one.
	if c.Analysis.Mixer.Set {
		sec, cards, err := mixerSection(c, nw)
		if err != nil {
			return nil, err
		}
		doc.Sections = append(doc.Sections, sec)
		doc.Cards = append(doc.Cards, cards...)
	}

	// Pulse, only when the file asks for one.
	if c.Analysis.Pulse.Set {
		sec, cards, err := pulseSection(c, nw)
		if err != nil {
			return nil, err
		}
		doc.Sections = append(doc.Sections, sec)
		doc.Cards = append(doc.Cards, cards...)
	}
	if dd, ok := <-distortion; ok {
		if dd.err != nil {
			return nil, dd.err
		}
		doc.Sections = slices.Insert(doc.Sections, at, dd.sec)
		doc.Cards = slices.Insert(doc.Cards, cardsAt, dd.cards...)
	}
	return doc, nil
}

// detectorFigures returns a detector's voltage sensitivity and its
// tangential sensitivity over the default video band: the distortion
// run's, when it found them (the same computation), else computed here.
func detectorFigures(nw *smallsignal.Network, path ac.NoiseSettings, carrierHz float64, res *plan.Distortion) (gamma, tss float64, err error) {
	if !math.IsNaN(res.TangentialDBm) {
		gamma, err = ac.VoltageSensitivity(nw, path, carrierHz)
		return gamma, res.TangentialDBm, err
	}
	det, err := ac.Detector(nw, path, carrierHz, plan.DefaultVideoFromHz, plan.DefaultVideoToHz)
	if err != nil {
		return 0, 0, err
	}
	return det.Sensitivity, det.TangentialDBm(), nil
}

// distortionSection is the Volterra estimate beside the waveform at the
// drive d, the validity limit, a level sweep and, for a detector, its
// transfer curve.
func distortionSection(nw *smallsignal.Network, d *plan.Drive) (Section, []Card, error) {
	sec := Section{ID: "distortion", Title: "Distortion",
		Intro: fmt.Sprintf("Port %s driven at %s, %.1f dBm available; output at %s.", d.InputName, si.Format(d.Drive.FrequencyHz, "Hz", 5), d.LevelDBm, d.OutputName)}
	var cards []Card
	// The waveform, the validity limit and a level sweep around the
	// chosen level for the figures.
	settings := steady.Settings{Harmonics: 5, Method: plan.ForElements(nw, nil)}
	var levels []float64
	for l := d.LevelDBm - 30; l <= d.LevelDBm+20+1e-9; l += 2 {
		levels = append(levels, l)
	}
	res, err := plan.RunDistortion(nw, d, plan.DistortionRequest{Waveform: settings, Sweep: settings, Validity: true, Levels: levels})
	if res == nil {
		return sec, nil, err
	}
	est := res.Estimate
	t, notes := EstimateTable(est)
	sec.Blocks = append(sec.Blocks, Block{Table: t})
	for _, n := range notes {
		sec.Blocks = append(sec.Blocks, Block{Note: n})
	}
	sec.Blocks = append(sec.Blocks, Block{Table: ContributionTable(est)})
	var werr *plan.WaveformError
	if errors.As(err, &werr) {
		sec.Blocks = append(sec.Blocks, Block{Note: "The waveform solve did not converge at this level: " + werr.Err.Error()})
		return sec, cards, nil
	}
	if err != nil {
		return sec, nil, err
	}
	one := d.OneTone()
	oneEst, st := res.OneTone, res.Waveform
	wt, note := WaveformTable(st)
	sec.Blocks = append(sec.Blocks, Block{Table: wt}, Block{Note: note}, Block{Table: StressTable(st)})
	for _, c := range st.Cautions() {
		cards = append(cards, Card{Label: "caution", Value: "overstress", Detail: c})
	}
	limit := res.Validity
	if res.ValidityErr != nil {
		sec.Blocks = append(sec.Blocks, Block{Note: "The validity limit could not be searched: " + res.ValidityErr.Error()})
	}
	ct, cnote := ComparisonTable(res.Comparison, limit)
	sec.Blocks = append(sec.Blocks, Block{Table: ct})
	if cnote != "" {
		sec.Blocks = append(sec.Blocks, Block{Note: cnote})
	}
	sweep := res.Sweep
	if cs := SweepCautions(sweep); len(cs) > 0 {
		sec.Blocks = append(sec.Blocks, Block{Note: "Over the level sweep: " + strings.Join(cs, "; ") + "."})
	}
	comp, compressed := res.CompressionDBm, res.Compressed
	for _, f := range DistortionFigures(oneEst, st, sweep, comp, compressed) {
		fig, err := SVGOf(f)
		if err != nil {
			return sec, nil, err
		}
		sec.Blocks = append(sec.Blocks, Block{Figure: fig})
	}
	if !est.Balanced(ac.HD2) {
		card := Card{Label: "second harmonic", Value: fmt.Sprintf("%.1f dBc", est.HD2dBc()), Detail: fmt.Sprintf("at %.0f dBm, %s", d.LevelDBm, si.Format(d.Drive.FrequencyHz, "Hz", 4))}
		// Past the small-signal limit the estimate is not the figure to
		// quote: the waveform's is.
		if limit != nil && limit.Outcome == steady.LimitFound && d.LevelDBm > limit.LevelDBm && len(st.Output) > 2 && st.Output[1].Amplitude > 0 {
			card.Value = fmt.Sprintf("%.1f dBc", 20*math.Log10(st.Output[2].Amplitude/st.Output[1].Amplitude))
			card.Detail += fmt.Sprintf(", from the waveform: the level is past the small-signal limit, where the estimate (%.1f dBc) no longer holds", est.HD2dBc())
		}
		cards = append(cards, card)
	}
	if limit != nil {
		switch limit.Outcome {
		case steady.LimitFound:
			cards = append(cards, Card{Label: "small-signal limit", Value: fmt.Sprintf("%.1f dBm", limit.LevelDBm), Detail: "estimates within 0.5 dB of the waveform"})
		case steady.HeldThroughout:
			cards = append(cards, Card{Label: "small-signal limit", Value: fmt.Sprintf("above %.1f dBm", limit.LevelDBm), Detail: "estimates within 0.5 dB at every level tried"})
		default:
			cards = append(cards, Card{Label: "small-signal limit", Value: "not found", Detail: limit.Note()})
		}
	}
	if compressed {
		cards = append(cards, Card{Label: "1 dB compression", Value: fmt.Sprintf("%.1f dBm", comp), Detail: "input, from the waveform"})
	}
	// A detector's transfer curve, from below its tangential
	// sensitivity to beyond square law.
	path := ac.NoiseSettings{Input: d.Drive.Input, Output: d.Drive.Output}
	if ac.Detects(nw, path, d.Drive.FrequencyHz) {
		if gamma, tss, err := detectorFigures(nw, path, d.Drive.FrequencyHz, res); err == nil {
			var levels []float64
			for l := math.Floor(tss/2)*2 - 10; l <= 10+1e-9; l += 2 {
				levels = append(levels, l)
			}
			tsweep, _ := steady.LevelSweep(nw, one, levels, settings, nil)
			if t, err := steady.DetectorTransfer(tsweep, gamma); err == nil {
				fig, err := SVGOf(plots.DetectorTransfer(t, tss))
				if err != nil {
					return sec, nil, err
				}
				sec.Blocks = append(sec.Blocks, Block{Note: "Detector transfer curve, from the waveform at each level, with the tangential sensitivity over a 1 Hz to 2 MHz video band."},
					Block{Figure: fig})
				if !math.IsNaN(t.DeviationDBm) {
					cards = append(cards, Card{Label: "square-law range", Value: fmt.Sprintf("%.1f dB", t.DynamicRangeDB(tss)),
						Detail: fmt.Sprintf("tangential sensitivity %.1f dBm to 1 dB deviation at %.1f dBm", tss, t.DeviationDBm)})
				}
			}
		}
	}
	return sec, cards, nil
}

// studySection runs the file's study.
func studySection(c *circuit.Circuit) (Section, error) {
	s, err := plan.ResolveStudy(c, plan.StudyRequest{})
	sec := Section{ID: "study", Title: "Study"}
	if err != nil {
		sec.Intro = "The file's study could not be set up: " + err.Error()
		return sec, nil
	}
	r, err := study.Run(c, s.Settings)
	if err != nil {
		return sec, err
	}
	sec.Intro = fmt.Sprintf("%s from %s to %s in %d steps (%d Newton iterations with continuation).", r.Settings.Axis.Vary.Text,
		FormatCell(r.Settings.Axis.Values[0], r.Settings.Axis.Vary.Quantity.Unit()), FormatCell(r.Settings.Axis.Values[len(r.Settings.Axis.Values)-1], r.Settings.Axis.Vary.Quantity.Unit()),
		len(r.Steps), r.Newton)
	for _, f := range StudyFigures(r, "") {
		fig, err := SVGOf(f)
		if err != nil {
			return sec, err
		}
		sec.Blocks = append(sec.Blocks, Block{Figure: fig})
	}
	cols := StudyColumns(r)
	t := StudyTable(r, cols)
	// Keep the report's table readable: at most a dozen rows.
	if n := len(t.Rows); n > 12 {
		var rows [][]string
		for k := 0; k < 12; k++ {
			rows = append(rows, t.Rows[int(math.Round(float64(k)*float64(n-1)/11))])
		}
		t.Rows = rows
		t.Caption = fmt.Sprintf("Study (12 of %d steps)", n)
	}
	sec.Blocks = append(sec.Blocks, Block{Table: t})
	return sec, nil
}

// biasCards returns the report's headline cards for the diodes' bias: one
// per diode, or for more than MaxListedDiodes one card with their count and
// current range (the operating-point section lists them all).
func biasCards(p *bias.Point) []Card {
	if len(p.Diodes) <= MaxListedDiodes {
		var cards []Card
		for _, d := range p.Diodes {
			cards = append(cards, Card{Label: d.Name + " bias", Value: si.Format(d.Current, "A", 3),
				Detail: fmt.Sprintf("r_d %s, C_j %s", si.Format(d.DynamicResistance, "Ω", 3), si.Format(d.JunctionCapacitance, "F", 3))})
		}
		return cards
	}
	lo, hi := CurrentRange(p.Diodes)
	least, most := si.Format(lo.Current, "A", 3), si.Format(hi.Current, "A", 3)
	card := Card{Label: fmt.Sprintf("bias of %d diodes", len(p.Diodes)), Value: least,
		Detail: "each; the operating point lists them"}
	if least != most {
		card.Value = least + " to " + most
		card.Detail = fmt.Sprintf("%s to %s; the operating point lists them all", lo.Name, hi.Name)
	}
	return []Card{card}
}

// noiseSection is the noise part of the design report: the file's
// defaults, the tables of the command, and headline cards (the noise
// figure at the file's carrier, or a detector's NEP and tangential
// sensitivity). A circuit without ports gets a section that says so.
// noiseSection is the noise analysis of the network nw linearised from c,
// and the detector's figures where its output detects.
func noiseSection(c *circuit.Circuit, nw *smallsignal.Network) (Section, []Card, error) {
	sec := Section{ID: "noise", Title: "Noise"}
	if len(c.Ports) == 0 {
		sec.Intro = "The circuit has no ports, so no noise is shown."
		return sec, nil, nil
	}
	n, err := plan.ResolveNoise(c, nw, plan.NoiseRequest{})
	if err != nil {
		sec.Intro = "The noise analysis could not be set up: " + err.Error()
		return sec, nil, nil
	}
	s := struct {
		c    *circuit.Circuit
		nw   *smallsignal.Network
		plan *plan.Noise
	}{c, nw, n}
	o, err := n.Run(nw)
	if err != nil {
		return sec, nil, err
	}
	var intro []string
	for _, l := range NoiseSetupLines(s.c, s.nw, s.plan) {
		intro = append(intro, l[0]+": "+l[1])
	}
	sec.Intro = strings.Join(intro, "; ") + "."
	for _, f := range NoiseFigures(o.Result) {
		fig, err := SVGOf(f)
		if err != nil {
			return sec, nil, err
		}
		sec.Blocks = append(sec.Blocks, Block{Figure: fig})
	}
	sec.Blocks = append(sec.Blocks, Block{Table: NoiseTable(o, 9)})
	sec.Blocks = append(sec.Blocks, Block{Note: strings.Join(NoiseNotes(o), "; ") + "."})
	if o.Band != nil {
		sec.Blocks = append(sec.Blocks, Block{Table: BandTable(o)}, Block{Table: SourceTable(o)})
	}
	var cards []Card
	if o.Detection != nil {
		t, notes := DetectorTable(o)
		sec.Blocks = append(sec.Blocks, Block{Table: t}, Block{Note: strings.Join(notes, "; ") + "."})
		cards = append(cards,
			Card{Label: "noise-equivalent power", Value: Density(o.Detection.NEP, "W/√Hz"), Detail: fmt.Sprintf("at %s video frequency", si.Format(o.Detection.SpotHz, "Hz", 3))},
			Card{Label: "tangential sensitivity", Value: fmt.Sprintf("%.1f dBm", o.Detection.TangentialDBm()), Detail: fmt.Sprintf("at %s, video to %s", si.Format(o.Detection.CarrierHz, "Hz", 4), si.Format(o.Detection.Video.ToHz, "Hz", 3))})
	} else if s.plan.Settings.Input >= 0 && s.plan.CarrierHz > 0 {
		at, err := ac.Noise(s.nw, []float64{s.plan.CarrierHz}, s.plan.Settings)
		if err == nil {
			cards = append(cards, Card{Label: "noise figure", Value: FigureText(at.Points[0].FigureDB()),
				Detail: fmt.Sprintf("%s → %s at %s, source at 290 K", s.plan.InputName, s.plan.OutputName, si.Format(s.plan.CarrierHz, "Hz", 4))})
		}
	}
	return sec, cards, nil
}

// yieldSection is the report's yield analysis of the file's tolerances,
// with the file's analysis.yield targets, or the spread of the main
// figures when it gives none.
// yieldSection runs the file's tolerances, or follows the main figures'
// spread where the file names no targets; temperatureK, when not zero, is
// the temperature the report's bias was solved at.
func yieldSection(c *circuit.Circuit, temperatureK float64) (Section, []Card, error) {
	sec := Section{ID: "yield", Title: "Tolerances and yield"}
	s, err := plan.ResolveYield(c, plan.YieldRequest{Observe: true})
	if err == nil && temperatureK != 0 && len(s.TemperaturesK) == 0 {
		s.TemperaturesK = []float64{temperatureK}
	}
	if err == nil && len(s.Targets) == 0 {
		err = errors.New("the circuit has no port or target to follow; give analysis.yield targets")
	}
	if err != nil {
		sec.Intro = "The yield analysis could not be set up: " + err.Error()
		return sec, nil, nil
	}
	r, err := yield.Run(c, *s)
	if err != nil {
		return sec, nil, err
	}
	sec.Intro = fmt.Sprintf("%d circuits drawn over the file's %d toleranced values (seed %d) and analysed at %s.",
		len(r.Runs), len(c.Tolerances), r.Settings.Seed, TemperatureList(r.TemperaturesK))
	var cards []Card
	if len(r.Corners) > 0 {
		sec.Intro += fmt.Sprintf(" %d of them meet every target: a yield of %s, 95 %% interval %s to %s (Wilson score).",
			r.Passed, PercentOf(r.Yield), PercentOf(r.Interval[0]), PercentOf(r.Interval[1]))
		cards = append(cards, Card{Label: "yield", Value: PercentOf(r.Yield),
			Detail: fmt.Sprintf("%d of %d drawn circuits meet every target; 95 %% interval %s to %s", r.Passed, len(r.Runs), PercentOf(r.Interval[0]), PercentOf(r.Interval[1]))})
	} else {
		sec.Intro += " The file gives no yield targets (analysis.yield), so this shows how the main figures spread."
	}
	for _, t := range []*Table{YieldTargetTable(r), YieldShareTable(r)} {
		sec.Blocks = append(sec.Blocks, Block{Table: t})
	}
	if len(r.Corners) > 0 {
		sec.Blocks = append(sec.Blocks, Block{Table: YieldCornerTable(r)})
	}
	for _, f := range YieldFigures(r) {
		fig, err := SVGOf(f)
		if err != nil {
			return sec, nil, err
		}
		sec.Blocks = append(sec.Blocks, Block{Figure: fig})
	}
	for _, x := range r.Cautions {
		sec.Blocks = append(sec.Blocks, Block{Note: x.Message})
	}
	return sec, cards, nil
}

// pulseSection runs the file's pulse analysis for the report: its tables,
// figures and cautions, and headline cards. A run that cannot be made is
// a note in the section, not a failed report.
// pulseSection runs the file's pulse on the network nw.
func pulseSection(c *circuit.Circuit, nw *smallsignal.Network) (Section, []Card, error) {
	sec := Section{ID: "pulse", Title: "Under a pulse"}
	pl, err := plan.ResolvePulse(c, plan.PulseRequest{})
	if err != nil {
		sec.Intro = "The file's pulse could not be set up: " + err.Error()
		return sec, nil, nil
	}
	s := struct {
		nw              *smallsignal.Network
		inName, outName string
		levelDBm        float64
	}{nw, pl.InputName, pl.OutputName, pl.LevelDBm}
	res, runErr := transient.RunPulse(nw, pl.Settings)
	if res == nil {
		sec.Intro = "The pulse run failed: " + runErr.Error()
		return sec, nil, nil
	}
	pulse := res.Settings.Pulse
	sec.Intro = fmt.Sprintf("Port %s driven by a %s carrier at %.1f dBm available, width %s, rise %s, fall %s; output at %s, read as a %s. The circuit is followed in time from its DC point (%s, %d steps).",
		s.inName, si.Format(pulse.CarrierHz, "Hz", 4), s.levelDBm, si.Format(pulse.Width, "s", 3), si.Format(pulse.Rise, "s", 3), si.Format(pulse.Fall, "s", 3),
		s.outName, res.Kind, res.Run.Stats.Method, res.Run.Stats.Accepted)
	if runErr != nil {
		sec.Blocks = append(sec.Blocks, Block{Note: "The run " + runErr.Error() + "; the figures are of what it reached."})
	}
	if len(res.Pulses) > 0 {
		for _, t := range PulseTables(s.nw, res) {
			sec.Blocks = append(sec.Blocks, Block{Table: t})
		}
	}
	sec.Blocks = append(sec.Blocks, Block{Table: PulseStressTable(res)})
	for _, f := range plots.PulseFigures(res, s.nw) {
		fig, err := SVGOf(f)
		if err != nil {
			return sec, nil, err
		}
		sec.Blocks = append(sec.Blocks, Block{Figure: fig})
	}
	var cards []Card
	for _, x := range res.Cautions {
		sec.Blocks = append(sec.Blocks, Block{Note: "Caution: " + x.Message})
	}
	f := res.Figures
	if len(res.Pulses) > 0 {
		if res.Kind == transient.Detector {
			cards = append(cards, Card{Label: "pulse video", Value: si.Format(f.Settled, "V", 3), Detail: "rise " + TimeOf(f.RiseTime) + ", fall " + TimeOf(f.FallTime)})
		} else {
			cards = append(cards, Card{Label: "flat leakage", Value: DBmOf(f.Flat), Detail: fmt.Sprintf("%.1f dBm pulse; spike %s", s.levelDBm, DBmOf(f.SpikePeak))})
			if pulse.ProbeEMF != 0 {
				cards = append(cards, Card{Label: "recovery", Value: RecoveryText(f.Recovery1dB, f.Recovery1dBBound), Detail: "to within 1 dB of the loss before the pulse"})
			}
		}
	}
	return sec, cards, nil
}

// mixerSection is the file's mixer analysis under its LO: conversion,
// ports, the LO, the diodes, noise, cautions and the sweep of LO drive.
func mixerSection(c *circuit.Circuit, nw *smallsignal.Network) (Section, []Card, error) {
	sec := Section{ID: "mixer", Title: "Mixer under its LO"}
	m, err := plan.ResolveMixer(c, plan.MixerRequest{CheckShooting: true})
	if err != nil {
		sec.Intro = "The file's mixer analysis could not be set up: " + err.Error()
		return sec, nil, nil
	}
	res, err := mixer.Analyze(nw, m.Settings)
	if res == nil || err != nil {
		why := "no result"
		if err != nil {
			why = err.Error()
		}
		sec.Intro = "The mixer analysis failed: " + why
		return sec, nil, nil
	}
	lines := MixerSetupLines(nw, m)
	sec.Intro = fmt.Sprintf("LO: %s. RF: %s. IF: %s. The %s.", lines[0][1], lines[1][1], lines[2][1], MixerMethodLine(res))
	for _, t := range []*Table{MixerTable(res), MixerPortTable(nw, m, res), MixerLOTable(m, res),
		MixerDiodeTable(res), MixerNoiseTable(res, 6)} {
		sec.Blocks = append(sec.Blocks, Block{Table: t})
	}
	for _, msg := range MixerCautionMessages(res) {
		sec.Blocks = append(sec.Blocks, Block{Note: "Caution: " + msg})
	}
	pts := mixer.SweepLO(nw, m.Settings, plan.DefaultMixerLevels(m.LOLevelDBm), nil)
	fig, err := SVGOf(plots.MixerLevelSweep(pts, m.LOLevelDBm))
	if err != nil {
		return sec, nil, err
	}
	sec.Blocks = append(sec.Blocks, Block{Figure: fig}, Block{Table: MixerSweepTable(pts)})
	return sec, MixerCards(m, res), nil
}
