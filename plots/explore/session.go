package explore

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"sync"
	"time"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/ac/plan"
	"qpoint/ac/steady"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/diode"
	"qpoint/bias/si"
	"qpoint/plots"
	"qpoint/plots/report"
	"qpoint/smallsignal"
)

// Session explores one circuit file. It holds the file as read and
// loaded, its controls and the drive the plan resolves for it, and what
// the last move solved: the bias point each move's Newton starts from and
// the validity limit, with its waveform, each move's search starts from
// (continuation). A move that a newer one makes stale is cancelled.
//
// Moves, checks and saves may come from many goroutines (one per
// request); the session runs one analysis at a time.
type Session struct {
	file      string
	src       []byte
	base      *circuit.Circuit
	start     *circuit.Circuit // base with the starting values set
	controls  []Control
	gridHz    []float64
	drive     *plan.Drive // the file's drive; nil for a circuit without ports
	driveNote string      // why there is no drive, when there is none
	spacingHz float64     // a second tone's offset from the first; zero for one tone

	cancelMu sync.Mutex
	cancel   context.CancelFunc

	mu    sync.Mutex // one analysis at a time; guards what follows
	ws    smallsignal.Workspace
	last  *bias.Point
	held  *steady.State
	limit float64 // the last validity limit (dBm), NaN for none
	slope float64 // how steeply the estimates' difference grew there (decades/dB)
	fails float64 // where the estimates were seen not to hold above it; NaN for none
}

// NewSession reads the circuit file src (named file) and sets the
// starting values sets (`TARGET=VALUE`, as --set takes them). Its errors
// are the loader's and WithOverride's: bad input.
func NewSession(file string, src []byte, sets []string) (*Session, error) {
	c, err := circuit.Parse(file, src)
	if err != nil {
		return nil, err
	}
	start := c
	for _, set := range sets {
		if start, err = start.WithOverride(set); err != nil {
			return nil, err
		}
	}
	s := &Session{file: file, src: src, base: c, start: start, limit: math.NaN(), fails: math.NaN()}
	if s.gridHz, err = plan.ResponseGrid(c, plan.Grid{}); err != nil {
		return nil, err
	}
	if len(c.Ports) == 0 {
		s.driveNote = "The circuit has no ports: no response, distortion or detector figures."
	} else {
		s.drive, err = plan.ResolveDrive(c, plan.DriveRequest{FrequencyHz: plan.SignalFrequency(c)})
		if err != nil {
			return nil, err
		}
		if d := c.Analysis.Distortion; d.Set && d.SecondToneHz != 0 {
			s.spacingHz = d.SecondToneHz - d.FrequencyHz
		}
	}
	s.controls = controls(c, start, s.drive, [2]float64{s.gridHz[0], s.gridHz[len(s.gridHz)-1]})
	return s, nil
}

// Setup is what the page needs before its first move.
type Setup struct {
	Title    string    `json:"title"`
	File     string    `json:"file"`
	Controls []Control `json:"controls"`
	Diodes   []string  `json:"diodes"`
	// Warnings are the loader's cautions about the file.
	Warnings []string `json:"warnings"`
	Note     string   `json:"note,omitempty"`
}

// Setup returns the page's setup.
func (s *Session) Setup() Setup {
	u := Setup{Title: s.base.Name, File: s.file, Controls: s.controls, Note: s.driveNote}
	if u.Title == "" {
		u.Title = s.file
	}
	for _, p := range s.base.Parts {
		if p.Kind == circuit.Diode {
			u.Diodes = append(u.Diodes, p.Name)
		}
	}
	for _, w := range s.base.Warnings {
		u.Warnings = append(u.Warnings, w.String())
	}
	return u
}

// diodes counts the circuit's diodes.
func (s *Session) diodes() int {
	n := 0
	for _, p := range s.base.Parts {
		if p.Kind == circuit.Diode {
			n++
		}
	}
	return n
}

// Request is a move: every control's value as text, as typed or as a
// slider wrote it (a control left out keeps the file's value), and the
// diode the I–V figure shows.
type Request struct {
	Values map[string]string `json:"values"`
	Diode  int               `json:"diode"`
}

// Card is a headline figure.
type Card struct {
	Label  string `json:"label"`
	Value  string `json:"value"`
	Detail string `json:"detail"`
}

// Table is a formatted table; ID names it for the page.
type Table struct {
	ID      string     `json:"id"`
	Caption string     `json:"caption"`
	Header  []string   `json:"header"`
	Rows    [][]string `json:"rows"`
}

// Figure is an SVG figure; ID names it for the page.
type Figure struct {
	ID  string `json:"id"`
	SVG string `json:"svg"`
}

// Timing says where a move's server time went.
type Timing struct {
	TotalMS      float64 `json:"totalMs"`
	BiasMS       float64 `json:"biasMs"`
	ResponseMS   float64 `json:"responseMs"`
	OperatingMS  float64 `json:"operatingMs"`
	DistortionMS float64 `json:"distortionMs"`
	DetectorMS   float64 `json:"detectorMs"`
	// Newton is the bias solve's iteration count and Strategy what
	// converged; WaveformSolves counts the validity search's.
	Newton         int    `json:"newton"`
	Strategy       string `json:"strategy"`
	WaveformSolves int    `json:"waveformSolves"`
}

// View is what a move shows. With Errors (a value the file would refuse,
// keyed by control, in the loader's words) or a Failure (an analysis
// that did not converge) it carries nothing else, and the page keeps
// what it showed last.
type View struct {
	Errors   map[string]string  `json:"errors,omitempty"`
	Failure  string             `json:"failure,omitempty"`
	Resolved map[string]float64 `json:"resolved,omitempty"`
	Cards    []Card             `json:"cards,omitempty"`
	Tables   []Table            `json:"tables,omitempty"`
	Figures  []Figure           `json:"figures,omitempty"`
	Notes    []string           `json:"notes,omitempty"`
	Cautions []string           `json:"cautions,omitempty"`
	Set      string             `json:"set,omitempty"` // the values set, TARGET=VALUE, as the report names them
	// Refine asks for the same values again: the validity limit is known
	// only to a wider bracket than a move resolves, and the next move
	// starts from it.
	Refine bool   `json:"refine,omitempty"`
	Timing Timing `json:"timing"`
}

// values is a request resolved: the circuit with its values set and the
// drive.
type values struct {
	c     *circuit.Circuit
	drive *plan.Drive
	level string // the drive's level and frequency as given, for saving
	freq  string
	diode int
}

// resolve applies a request's values to the file's circuit: each value
// that differs from the file's through WithOverride, whose message for a
// value out of range is the loader's, and the drive through the plan.
func (s *Session) resolve(req Request) (*values, map[string]string) {
	errs := map[string]string{}
	known := map[string]bool{}
	c := s.base
	for _, ctl := range s.controls {
		known[ctl.Name] = true
		text, ok := req.Values[ctl.Name]
		if !ok || ctl.Name == DriveLevel || ctl.Name == DriveFrequency {
			continue
		}
		text = strings.TrimSpace(text)
		if v, err := c.ResolveVary(ctl.Name); err == nil {
			if x, err := circuit.ParseBounded(text, v.Quantity); err == nil && x == v.Value(s.base) {
				continue // the file's own value: nothing to set
			}
		}
		next, err := c.WithOverride(ctl.Name + "=" + text)
		if err != nil {
			errs[ctl.Name] = err.Error()
			continue
		}
		c = next
	}
	for name := range req.Values {
		if !known[name] {
			errs[name] = fmt.Sprintf("`%s` is not a value of this circuit", name)
		}
	}
	out := &values{c: c, diode: req.Diode}
	if n := s.diodes(); req.Diode < 0 || req.Diode > 0 && req.Diode >= n {
		errs["diode"] = fmt.Sprintf("diode %d: the circuit has %d", req.Diode, n)
	}
	if s.drive == nil {
		return out, errs
	}
	dr := plan.DriveRequest{Input: s.drive.InputName, Output: s.drive.OutputName, FrequencyHz: s.drive.FrequencyHz}
	lv := circuit.Level{DBm: s.drive.LevelDBm, IsPower: true}
	if text, ok := req.Values[DriveFrequency]; ok {
		out.freq = strings.TrimSpace(text)
		f, err := circuit.ParseBounded(out.freq, circuit.Frequency)
		if err != nil {
			errs[DriveFrequency] = err.Error()
		} else {
			dr.FrequencyHz = f
		}
	}
	if text, ok := req.Values[DriveLevel]; ok {
		out.level = strings.TrimSpace(text)
		l, err := circuit.ParseLevel(out.level)
		if err != nil {
			errs[DriveLevel] = err.Error()
		} else {
			lv = l
		}
	}
	dr.Level = &lv
	if s.spacingHz != 0 {
		dr.SecondToneHz = dr.FrequencyHz + s.spacingHz
	}
	if len(errs) > 0 {
		return out, errs
	}
	d, err := plan.ResolveDrive(c, dr)
	if err != nil {
		name := DriveFrequency
		var re *plan.RequestError
		if errors.As(err, &re) && len(re.Settings) > 0 && re.Settings[0] == "level" {
			name = DriveLevel
		}
		if re != nil && !re.FromFile() {
			err = re.Err
		}
		errs[name] = err.Error()
		return out, errs
	}
	out.drive = d
	return out, errs
}

// begin cancels the analysis under way, if any, and returns the context
// of the next.
func (s *Session) begin(parent context.Context) (context.Context, context.CancelFunc) {
	ctx, cancel := context.WithCancel(parent)
	s.cancelMu.Lock()
	if s.cancel != nil {
		s.cancel()
	}
	s.cancel = cancel
	s.cancelMu.Unlock()
	return ctx, cancel
}

// moveSteady is how a move solves the validity search's waveforms:
// shooting at 63 samples a period (Richardson over 63 and 127), a quarter
// of the cost at the 255 the waveform check's search takes
// (TestValidityNearAgrees holds the searches together).
var moveSteady = steady.Settings{Harmonics: 5, Samples: 63}

// moveResolutionDB is the width a move's validity search bisects to, and
// moveMaxSolves and moveBudget the waveform solves and the time it may
// spend closing its bracket: a move that jumps far (a click on a
// slider's track, a typed value) answers with a wider bracket, marked for
// refining, and the page asks again at the same values, which starts from
// it.
const (
	moveResolutionDB = 0.25
	moveMaxSolves    = 4
	moveBudget       = 12 * time.Millisecond
)

// moveNoiseTolerance is how far a move integrates a detector's video
// noise: to 1e-4, which keeps the tangential sensitivity within 0.001 dB
// of the full integration's (ac.DetectorWithin) at a twentieth of its
// cost on the detector demo.
const moveNoiseTolerance = 1e-4

// Move analyses the circuit at the request's values: the bias point from
// the last move's, the Q-point tables and the I–V figure with its load
// line, the response over the file's band with the Smith chart, the
// Volterra estimate with the validity limit searched from the last, and
// a detector's sensitivity. It returns ctx's error, and no view, when a
// newer move or check made it stale before it finished.
func (s *Session) Move(ctx context.Context, req Request) (*View, error) {
	ctx, cancel := s.begin(ctx)
	defer cancel()
	s.mu.Lock()
	defer s.mu.Unlock()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	t0 := time.Now()
	v := &View{}
	vals, errs := s.resolve(req)
	if len(errs) > 0 {
		v.Errors = errs
		return v, nil
	}
	p, nw, err := s.solve(vals.c, &s.ws)
	v.Timing.BiasMS = ms(time.Since(t0))
	if err != nil {
		v.Failure = err.Error()
		return v, nil
	}
	v.Timing.Newton, v.Timing.Strategy = p.Stats.Iterations, p.Stats.Strategy.String()
	v.Resolved = s.resolved(vals)
	v.Set = setLine(vals.c)
	for _, d := range p.Diodes {
		v.Cards = append(v.Cards, Card{Label: d.Name + " current", Value: si.Format(d.Current, "A", 4),
			Detail: fmt.Sprintf("r_d %s, C_j %s", si.Format(d.DynamicResistance, "Ω", 3), si.Format(d.JunctionCapacitance, "F", 3))})
	}
	for _, t := range report.BiasTables(p) {
		id := "nodes"
		switch {
		case strings.HasPrefix(t.Caption, "Diode Q points") || t.Caption == "":
			id = "qpoints"
		case strings.HasPrefix(t.Caption, "Source"):
			id = "sources"
		}
		v.Tables = append(v.Tables, table(id, t))
	}
	for _, w := range p.Warnings {
		v.Cautions = append(v.Cautions, w.Part+": "+w.Message)
	}

	// The analyses of the point are independent: run them side by side.
	var (
		wg                     sync.WaitGroup
		resp, op, dist, detect part
	)
	run := func(pt *part, f func(pt *part) error) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			t := time.Now()
			defer func() {
				pt.ms = ms(time.Since(t))
				if r := recover(); r != nil {
					pt.err = fmt.Errorf("internal error: %v", r)
				}
			}()
			pt.err = f(pt)
		}()
	}
	run(&op, func(pt *part) error { return s.operating(pt, p, nw, vals.diode) })
	if vals.drive != nil {
		run(&resp, func(pt *part) error { return s.response(pt, nw, vals.drive) })
		run(&dist, func(pt *part) error { return s.distortion(ctx, pt, nw, vals.drive) })
		run(&detect, func(pt *part) error { return s.detector(pt, vals.c, nw, vals.drive) })
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	for _, pt := range []*part{&op, &resp, &dist, &detect} {
		if pt.err != nil {
			v.Notes = append(v.Notes, pt.err.Error())
		}
		v.Cards = append(v.Cards, pt.cards...)
		v.Tables = append(v.Tables, pt.tables...)
		v.Figures = append(v.Figures, pt.figures...)
		v.Notes = append(v.Notes, pt.notes...)
		v.Cautions = append(v.Cautions, pt.cautions...)
	}
	if s.drive == nil {
		v.Notes = append(v.Notes, s.driveNote)
	}
	v.Timing.ResponseMS, v.Timing.OperatingMS, v.Timing.DistortionMS, v.Timing.DetectorMS = resp.ms, op.ms, dist.ms, detect.ms
	v.Timing.WaveformSolves = dist.solves
	v.Refine = dist.refine
	s.last = p
	if dist.validity != nil {
		switch dist.validity.Outcome {
		case steady.LimitFound, steady.HeldThroughout:
			s.limit, s.held, s.fails = dist.validity.LevelDBm, dist.validity.Held, dist.validity.FailsDBm
			if dist.validity.Slope > 0 {
				s.slope = dist.validity.Slope
			}
		}
	}
	v.Timing.TotalMS = ms(time.Since(t0))
	return v, nil
}

// part is what one analysis of a move adds to the view.
type part struct {
	cards    []Card
	tables   []Table
	figures  []Figure
	notes    []string
	cautions []string
	err      error
	ms       float64
	solves   int
	validity *steady.Validity
	refine   bool
}

func ms(d time.Duration) float64 { return float64(d.Microseconds()) / 1e3 }

// solve finds the bias point of c from the last move's and linearises
// it: in the session's workspace for a move (ws), which keeps each line's
// S-matrices from move to move, or afresh for a network that may outlive
// the session's lock (a check's).
func (s *Session) solve(c *circuit.Circuit, ws *smallsignal.Workspace) (*bias.Point, *smallsignal.Network, error) {
	p, err := bias.Solve(c, bias.Settings{Start: s.last})
	if err != nil {
		return nil, nil, fmt.Errorf("bias: %w", err)
	}
	if ws == nil {
		ws = new(smallsignal.Workspace)
	}
	nw, err := ws.New(p)
	if err != nil {
		return nil, nil, fmt.Errorf("small-signal model: %w", err)
	}
	return p, nw, nil
}

// resolved returns each control's value in the page's units.
func (s *Session) resolved(vals *values) map[string]float64 {
	out := map[string]float64{}
	for _, ctl := range s.controls {
		switch ctl.Name {
		case DriveLevel:
			if vals.drive != nil {
				out[ctl.Name] = vals.drive.LevelDBm
			}
		case DriveFrequency:
			if vals.drive != nil {
				out[ctl.Name] = vals.drive.FrequencyHz
			}
		default:
			v, err := vals.c.ResolveVary(ctl.Name)
			if err != nil {
				continue
			}
			x := v.Value(vals.c)
			if ctl.Unit == "°C" {
				x -= diode.ZeroCelsius
			}
			out[ctl.Name] = x
		}
	}
	for k, x := range out {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			delete(out, k)
		}
	}
	return out
}

// setLine lists the values set, as the report's subtitle does.
func setLine(c *circuit.Circuit) string {
	var parts []string
	for _, o := range c.Overrides {
		parts = append(parts, o.String())
	}
	return strings.Join(parts, ", ")
}

// operating draws diode k's I–V figure with its load line.
func (s *Session) operating(pt *part, p *bias.Point, nw *smallsignal.Network, k int) error {
	if len(p.Diodes) == 0 {
		return nil
	}
	if k < 0 || k >= len(p.Diodes) {
		k = 0
	}
	l, err := nw.LoadLine(k)
	if err != nil {
		return err
	}
	return pt.figure("operating", plots.OperatingPoint(p.Diodes[k], l))
}

// response sweeps the file's band and draws the transmission, return loss
// and Smith chart with the drive's frequency marked.
func (s *Session) response(pt *part, nw *smallsignal.Network, d *plan.Drive) error {
	r, err := ac.Run(nw, s.gridHz, ac.Settings{})
	if err != nil {
		return fmt.Errorf("response: %w", err)
	}
	if err := pt.figure("match", plots.Match(r, d.Drive.Input, d.Drive.Output.Port, d.FrequencyHz)); err != nil {
		return err
	}
	if err := pt.figure("smith", plots.Smith(r, d.FrequencyHz)); err != nil {
		return err
	}
	at, err := ac.Run(nw, []float64{d.FrequencyHz}, ac.Settings{})
	if err != nil {
		return fmt.Errorf("response at %s: %w", si.Format(d.FrequencyHz, "Hz", 4), err)
	}
	pnt := at.Points[0]
	where := "at " + si.Format(d.FrequencyHz, "Hz", 4)
	if out := d.Drive.Output.Port; out >= 0 {
		pt.cards = append(pt.cards, Card{Label: fmt.Sprintf("S%d%d, %s to %s", out+1, d.Drive.Input+1, d.InputName, d.OutputName), Value: fmt.Sprintf("%.2f dB", report.DB(pnt.S[out][d.Drive.Input])), Detail: where})
	}
	in := d.Drive.Input
	pt.cards = append(pt.cards, Card{Label: "return loss, " + d.InputName, Value: fmt.Sprintf("%.2f dB", -report.DB(pnt.S[in][in])),
		Detail: where + ", Z_in " + report.FormatImpedance(pnt.InputImpedance[in])})
	return nil
}

// distortion estimates the products at the drive and searches for the
// validity limit from the last move's.
func (s *Session) distortion(ctx context.Context, pt *part, nw *smallsignal.Network, d *plan.Drive) error {
	est, err := ac.Volterra(nw, d.Drive)
	if err != nil {
		return fmt.Errorf("distortion: %w", err)
	}
	t, notes := report.EstimateTable(est)
	t.Caption += fmt.Sprintf(" at %.1f dBm, %s", d.LevelDBm, si.Format(d.FrequencyHz, "Hz", 4))
	pt.tables = append(pt.tables, table("estimate", t))
	pt.notes = append(pt.notes, notes...)
	if cmplx.Abs(est.Linear) > 1e-12*est.Drive.EMF {
		if !est.Balanced(ac.HD2) {
			pt.cards = append(pt.cards, Card{Label: "second harmonic", Value: report.DBc(est.HD2dBc()), Detail: fmt.Sprintf("at %.1f dBm", d.LevelDBm)})
		}
		if !est.Balanced(ac.HD3) {
			pt.cards = append(pt.cards, Card{Label: "third harmonic", Value: report.DBc(est.HD3dBc()), Detail: fmt.Sprintf("at %.1f dBm", d.LevelDBm)})
		}
		if d.SecondToneHz != 0 && !est.Balanced(ac.IM3) {
			pt.cards = append(pt.cards, Card{Label: "IM3", Value: report.DBc(est.IM3dBc()), Detail: fmt.Sprintf("IIP3 %.1f dBm", est.IIP3dBm())})
		}
	}
	guess := s.limit
	switch {
	case math.IsNaN(guess):
		guess = d.LevelDBm
	case s.fails-s.limit > moveResolutionDB:
		guess = (s.limit + s.fails) / 2 // inside the last bracket, left wide
	}
	lo := math.Max(circuit.MinLevelDBm, d.LevelDBm-100)
	hi := math.Min(circuit.MaxLevelDBm, d.LevelDBm+40)
	settings := moveSteady
	settings.Start = s.held
	if plan.ForElements(nw, nil) != nil {
		// Lines need harmonic balance (the plan's choice). A move's
		// starts at 8 harmonics rather than 16 (growing while its
		// spectrum has not fallen off) and solves its Newton steps by
		// GMRES: 2.3 ms a solve on the matched detector against 18 ms by
		// the dense LU the automatic choice takes at its size, to the
		// same result.
		settings.Method = balance.Method{Choice: balance.Auto, Settings: balance.Settings{Harmonics: 8, Linear: balance.Krylov}}
	}
	v, err := steady.ValidityNear(ctx, nw, d.OneTone(), steady.ValiditySearch{GuessDBm: guess, ResolutionDB: moveResolutionDB, TolDB: 0.5,
		LowestDBm: lo, HighestDBm: hi, Steady: settings, Slope: s.slope, MaxSolves: moveMaxSolves, Budget: moveBudget})
	if err != nil {
		if ctx.Err() != nil {
			return nil // stale: the move is dropped
		}
		return fmt.Errorf("validity limit: %w", err)
	}
	pt.solves, pt.validity = v.Steps, v
	card := Card{Label: "small-signal limit", Detail: fmt.Sprintf("estimates within 0.5 dB of the waveform (%d waveform solves, %.2f dB steps)", v.Steps, moveResolutionDB)}
	switch v.Outcome {
	case steady.LimitFound:
		card.Value = fmt.Sprintf("%.1f dBm", v.LevelDBm)
		if v.FailsDBm-v.LevelDBm > moveResolutionDB+1e-9 {
			card.Detail = fmt.Sprintf("estimates within 0.5 dB here, not at %.1f dBm; refining (%d waveform solves)", v.FailsDBm, v.Steps)
			pt.refine = true
		}
	case steady.HeldThroughout:
		card.Value = fmt.Sprintf("above %.1f dBm", v.LevelDBm)
	default:
		card.Value, card.Detail = "not found", v.Note()
	}
	pt.cards = append(pt.cards, card)
	pt.notes = append(pt.notes, "Small-signal validity: "+v.Note()+".")
	return nil
}

// detector gives a detector's sensitivity when the drive's output is one
// (a DC-coupled output whose level the carrier moves more than its
// fundamental).
func (s *Session) detector(pt *part, c *circuit.Circuit, nw *smallsignal.Network, d *plan.Drive) error {
	n, err := plan.ResolveNoise(c, nw, plan.NoiseRequest{Input: d.InputName, Output: d.OutputName})
	if err != nil || n.Settings.Input < 0 || !ac.Detects(nw, n.Settings, d.FrequencyHz) {
		return nil
	}
	det, err := ac.DetectorWithin(nw, n.Settings, d.FrequencyHz, n.VideoBandHz[0], n.VideoBandHz[1], moveNoiseTolerance)
	if err != nil {
		return fmt.Errorf("detector: %w", err)
	}
	t, notes := report.DetectorTable(&plan.NoiseRun{Plan: n, Detection: det})
	pt.tables = append(pt.tables, table("detector", t))
	pt.notes = append(pt.notes, strings.Join(notes, " "))
	pt.cards = append(pt.cards,
		Card{Label: "voltage sensitivity", Value: si.Format(det.Sensitivity, "V/W", 3), Detail: "at " + si.Format(d.FrequencyHz, "Hz", 4)},
		Card{Label: "tangential sensitivity", Value: fmt.Sprintf("%.1f dBm", det.TangentialDBm()),
			Detail: fmt.Sprintf("video band %s to %s", si.Format(n.VideoBandHz[0], "Hz", 3), si.Format(n.VideoBandHz[1], "Hz", 3))})
	return nil
}

// pageScale is the size the page draws figures at, relative to the
// report's: the type keeps its size, so it reads larger beside the
// smaller plot, as a panel a third of a screen wide needs.
const pageScale = 0.82

// figure renders f as SVG into the part.
func (pt *part) figure(id string, f *plots.Figure) error {
	f.Width, f.Height = f.Width*pageScale, f.Height*pageScale
	var b bytes.Buffer
	if err := plots.Write(&b, "svg", f); err != nil {
		return err
	}
	pt.figures = append(pt.figures, Figure{ID: id, SVG: b.String()})
	return nil
}

func table(id string, t *report.Table) Table {
	return Table{ID: id, Caption: t.Caption, Header: t.Header, Rows: t.Rows}
}

// formatLevel writes a level in dBm as the circuit file reads it.
func formatLevel(dBm float64) string { return strconv.FormatFloat(dBm, 'f', 1, 64) + "dBm" }
