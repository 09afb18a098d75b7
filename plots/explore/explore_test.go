package explore

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"qpoint/ac/mixer"
	"qpoint/ac/plan"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots/report"
	"qpoint/smallsignal"
)

var demos = []string{"detector", "attenuator", "limiter", "mixer", "matched_detector"}

func demoPath(name string) string {
	return filepath.Join("..", "..", "testdata", "demo", name+".yaml")
}

func newSession(t testing.TB, name string, sets ...string) *Session {
	t.Helper()
	src, err := os.ReadFile(demoPath(name))
	if err != nil {
		t.Fatal(err)
	}
	s, err := NewSession(demoPath(name), src, sets)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// startValues is every control at its starting text, as the page sends
// them on its first move.
func startValues(s *Session) map[string]string {
	v := map[string]string{}
	for _, c := range s.controls {
		v[c.Name] = c.Text
	}
	return v
}

func control(t testing.TB, s *Session, name string) Control {
	t.Helper()
	for _, c := range s.controls {
		if c.Name == name {
			return c
		}
	}
	t.Fatalf("no control %s", name)
	return Control{}
}

// TestMoveEqualsBias: after a move, the Q-point table shows what a cold
// bias solve of the file with the same value set shows (qpoint bias
// --set prints the same table, report.BiasTables): continuation changes
// how Newton starts, not where it ends, to the solver's tolerance.
func TestMoveEqualsBias(t *testing.T) {
	moves := map[string]string{"detector": "Rbias.value", "attenuator": "Vctl.value", "limiter": "temperature", "mixer": "Vbias.value", "matched_detector": "temperature"}
	for _, name := range demos {
		s := newSession(t, name)
		vals := startValues(s)
		if _, err := s.Move(context.Background(), Request{Values: vals}); err != nil {
			t.Fatal(err)
		}
		ctl := control(t, s, moves[name])
		// A slider dragged from the middle to three quarters of its way.
		for _, pos := range []int{550, 650, 750} {
			x := ctl.Min + (ctl.Max-ctl.Min)*float64(pos)/1000
			if ctl.Log {
				x = ctl.Min * math.Pow(ctl.Max/ctl.Min, float64(pos)/1000)
			}
			vals[ctl.Name] = ctl.text(x)
			v, err := s.Move(context.Background(), Request{Values: vals})
			if err != nil || v.Errors != nil || v.Failure != "" {
				t.Fatalf("%s %s=%s: %v %v %s", name, ctl.Name, vals[ctl.Name], err, v.Errors, v.Failure)
			}
			c, err := circuit.Load(demoPath(name))
			if err != nil {
				t.Fatal(err)
			}
			if c, err = c.WithOverride(ctl.Name + "=" + vals[ctl.Name]); err != nil {
				t.Fatal(err)
			}
			p, err := bias.Solve(c, bias.Settings{})
			if err != nil {
				t.Fatal(err)
			}
			want := report.BiasTables(p)
			got := tableByID(v.Tables, "qpoints")
			q := want[len(want)-1]
			if got == nil || strings.Join(got.Header, "|") != strings.Join(q.Header, "|") || len(got.Rows) != len(q.Rows) {
				t.Fatalf("%s: Q-point table %+v, want %+v", name, got, q)
			}
			for i := range q.Rows {
				if strings.Join(got.Rows[i], "|") != strings.Join(q.Rows[i], "|") {
					t.Errorf("%s %s=%s: row %q shows %v, a cold solve %v", name, ctl.Name, vals[ctl.Name], q.Rows[i][0], got.Rows[i][1:], q.Rows[i][1:])
				}
			}
		}
	}
}

func tableByID(ts []Table, id string) *Table {
	for i := range ts {
		if ts[i].ID == id {
			return &ts[i]
		}
	}
	return nil
}

// TestMovePanels: a move of each demo draws the I–V, transmission and
// Smith figures and the estimate, and finds a validity limit; a detector
// output (the two detector demos) gets its sensitivity, the others none.
func TestMovePanels(t *testing.T) {
	for _, name := range demos {
		s := newSession(t, name)
		v, err := s.Move(context.Background(), Request{Values: startValues(s)})
		if err != nil || v.Errors != nil || v.Failure != "" {
			t.Fatalf("%s: %v %v %s", name, err, v.Errors, v.Failure)
		}
		figs := map[string]bool{}
		for _, f := range v.Figures {
			figs[f.ID] = strings.HasPrefix(f.SVG, "<?xml") || strings.HasPrefix(f.SVG, "<svg")
		}
		for _, id := range []string{"operating", "match", "smith"} {
			if !figs[id] {
				t.Errorf("%s: no %s figure", name, id)
			}
		}
		if tableByID(v.Tables, "estimate") == nil {
			t.Errorf("%s: no estimate", name)
		}
		if (tableByID(v.Tables, "detector") != nil) != strings.HasSuffix(name, "detector") {
			t.Errorf("%s: detector table present %v", name, tableByID(v.Tables, "detector") != nil)
		}
		found := false
		for _, c := range v.Cards {
			found = found || c.Label == "small-signal limit" && strings.HasSuffix(c.Value, "dBm")
		}
		if !found {
			t.Errorf("%s: no validity limit among %+v", name, v.Cards)
		}
	}
}

// TestRefusedLikeTheLoader: a value the file would refuse is refused with
// the loader's reason and what it accepts, under its control's name, and
// nothing is analysed.
func TestRefusedLikeTheLoader(t *testing.T) {
	s := newSession(t, "detector")
	src, err := os.ReadFile(demoPath("detector"))
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []struct{ name, text, file, fileText string }{
		{"Rbias.value", "-5k", "value: 220k}", "value: -5k}"},
		{"Rbias.value", "12V", "value: 220k}", "value: 12V}"},
		{"detector_low_barrier.ideality", "0.5", "ideality: 1.05", "ideality: 0.5"},
		{"temperature", "-300C", "temperature: 27C", "temperature: -300C"},
	} {
		vals := startValues(s)
		vals[k.name] = k.text
		v, err := s.Move(context.Background(), Request{Values: vals})
		if err != nil {
			t.Fatal(err)
		}
		msg := v.Errors[k.name]
		if msg == "" || v.Tables != nil {
			t.Errorf("%s=%s: errors %v, tables %d", k.name, k.text, v.Errors, len(v.Tables))
			continue
		}
		_, ferr := circuit.Parse("detector.yaml", []byte(strings.Replace(string(src), k.file, k.fileText, 1)))
		if ferr == nil {
			t.Fatalf("the loader takes %s", k.fileText)
		}
		// The reason and the accepted forms: what follows the value.
		tail := msg[strings.LastIndex(msg, " is ")+4:]
		if !strings.HasSuffix(ferr.Error(), tail) {
			t.Errorf("%s=%s: explorer says %q, loader %q", k.name, k.text, msg, ferr.Error())
		}
	}
	vals := startValues(s)
	vals[DriveLevel] = "100kV"
	v, _ := s.Move(context.Background(), Request{Values: vals})
	if !strings.Contains(v.Errors[DriveLevel], "accepted: -200 dBm to +90 dBm") {
		t.Errorf("a level of 100 kV peak: %v", v.Errors)
	}
	vals = startValues(s)
	vals["Rnone.value"] = "1k"
	if v, _ := s.Move(context.Background(), Request{Values: vals}); v.Errors["Rnone.value"] == "" {
		t.Errorf("an unknown value: %v", v.Errors)
	}
}

// TestStaleMoveCancelled: a move made stale by a newer one stops and
// gives no view; the newer one is answered.
func TestStaleMoveCancelled(t *testing.T) {
	s := newSession(t, "mixer")
	var wg sync.WaitGroup
	var first error
	wg.Add(1)
	go func() {
		defer wg.Done()
		// The first move searches the validity limit from nothing: tens
		// of waveform solves.
		_, first = s.Move(context.Background(), Request{Values: startValues(s)})
	}()
	time.Sleep(20 * time.Millisecond)
	vals := startValues(s)
	vals["Vbias.value"] = "2.6"
	v, err := s.Move(context.Background(), Request{Values: vals})
	wg.Wait()
	if err != nil || v.Failure != "" || v.Errors != nil {
		t.Fatalf("the newer move: %v %v", err, v)
	}
	if !errors.Is(first, context.Canceled) {
		t.Errorf("the stale move returned %v, want context.Canceled", first)
	}
}

// TestCheck: the waveform check (the report's distortion run) reports
// its progress and sets the waveform beside the estimate, with the level
// sweep and the detector's transfer curve; its validity limit at full
// accuracy (ValidityLimit's climb) lies within the move's resolution of
// the move's (ValidityNear's, at 63 samples a period).
func TestCheck(t *testing.T) {
	if testing.Short() {
		t.Skip("the waveform check solves about 60 waveforms")
	}
	s := newSession(t, "detector")
	v, err := s.Move(context.Background(), Request{Values: startValues(s)})
	// As the page does: the same values again while the limit is only
	// bracketed.
	for k := 0; k < 3 && err == nil && v.Refine; k++ {
		v, err = s.Move(context.Background(), Request{Values: startValues(s)})
	}
	if err != nil || v.Refine {
		t.Fatalf("%v; still refining: %v", err, v.Refine)
	}
	moveLimit := s.limit
	stages := map[string]int{}
	c, err := s.Check(context.Background(), Request{Values: startValues(s)}, func(p Progress) { stages[p.Stage]++ })
	if err != nil || c.Failure != "" || c.Errors != nil {
		t.Fatalf("%v %s %v", err, c.Failure, c.Errors)
	}
	for _, st := range []string{"waveform and validity limit", "level sweep"} {
		if stages[st] == 0 {
			t.Errorf("no progress from stage %q: %v", st, stages)
		}
	}
	for _, id := range []string{"waveform", "comparison", "stress"} {
		if tableByID(c.Tables, id) == nil {
			t.Errorf("no %s table", id)
		}
	}
	figs := map[string]bool{}
	for _, f := range c.Figures {
		figs[f.ID] = true
	}
	for _, id := range []string{"harmonics", "level-sweep", "transfer"} {
		if !figs[id] {
			t.Errorf("no %s figure", id)
		}
	}
	var limit float64
	for _, cd := range c.Cards {
		if cd.Label == "small-signal limit" {
			limit, _ = parseDBm(cd.Value)
		}
	}
	if math.Abs(limit-moveLimit) > moveResolutionDB+0.05 {
		t.Errorf("full-accuracy limit %.2f dBm, the move's %.2f dBm (cards %v)", limit, moveLimit, v.Cards)
	}
}

// TestCheckMixer: on a file with a mixer analysis the check adds the
// mixer under its LO, and at a moved bias (Vbias 1.5 V) its conversion
// loss is the one the mixer analysis gives for the file with that value
// set (plan.ResolveMixer and mixer.Analyze on the loaded circuit, as
// `qpoint mixer --set Vbias.value=1.5V` runs them); the detector demo,
// without one, gets no mixer tables.
func TestCheckMixer(t *testing.T) {
	if testing.Short() {
		t.Skip("the waveform check and a pumped mixer")
	}
	s := newSession(t, "mixer")
	vals := startValues(s)
	vals["Vbias.value"] = "1.5"
	stages := map[string]bool{}
	c, err := s.Check(context.Background(), Request{Values: vals}, func(p Progress) { stages[p.Stage] = true })
	if err != nil || c.Failure != "" || c.Errors != nil {
		t.Fatalf("%v %s %v", err, c.Failure, c.Errors)
	}
	if !stages["mixer under its LO"] {
		t.Errorf("no progress from the mixer stage: %v", stages)
	}
	for _, id := range []string{"mixer", "mixer-ports", "mixer-lo", "mixer-diodes", "mixer-noise"} {
		if tableByID(c.Tables, id) == nil {
			t.Errorf("no %s table", id)
		}
	}
	shown := ""
	for _, cd := range c.Cards {
		if cd.Label == "conversion loss" {
			shown = cd.Value
		}
	}

	file, err := circuit.Load(demoPath("mixer"))
	if err != nil {
		t.Fatal(err)
	}
	cc, err := file.WithOverride("Vbias.value=1.5V")
	if err != nil {
		t.Fatal(err)
	}
	p, err := bias.Solve(cc, bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		t.Fatal(err)
	}
	m, err := plan.ResolveMixer(cc, plan.MixerRequest{})
	if err != nil {
		t.Fatal(err)
	}
	r, err := mixer.Analyze(nw, m.Settings)
	if err != nil {
		t.Fatal(err)
	}
	if want := report.FigureText(r.ConversionLossDB); shown != want {
		t.Errorf("conversion loss at Vbias 1.5 V: the check shows %q, the mixer analysis gives %q", shown, want)
	}

	d := newSession(t, "detector")
	dc, err := d.Check(context.Background(), Request{Values: startValues(d)}, nil)
	if err != nil || dc.Failure != "" {
		t.Fatalf("%v %s", err, dc.Failure)
	}
	if tableByID(dc.Tables, "mixer") != nil {
		t.Error("the detector's check shows a mixer table")
	}
}

func parseDBm(s string) (float64, error) {
	lv, err := circuit.ParseLevel(strings.ReplaceAll(s, " ", ""))
	return lv.DBm, err
}

// TestCircuitFile: the values saved read back as set, in the file's own
// text; the drive goes into analysis.distortion.
func TestCircuitFile(t *testing.T) {
	s := newSession(t, "detector")
	vals := startValues(s)
	vals["Rbias.value"] = "100k"
	vals["temperature"] = "85C"
	vals[DriveLevel] = "-20dBm"
	data, err := s.CircuitFile(Request{Values: vals})
	if err != nil {
		t.Fatal(err)
	}
	c, err := circuit.Parse("saved.yaml", data)
	if err != nil {
		t.Fatalf("%v\n%s", err, data)
	}
	if c.Parts[1].Value != 100e3 || c.TemperatureK != 358.15 || c.Analysis.Distortion.Level.DBm != -20 {
		t.Errorf("saved file reads Rbias %g, %g K, %g dBm:\n%s", c.Parts[1].Value, c.TemperatureK, c.Analysis.Distortion.Level.DBm, data)
	}
	if !strings.HasPrefix(string(data), "# Written by qpoint explore from ") || !strings.Contains(string(data), "Rbias.value=100k") {
		t.Errorf("no header naming the values:\n%s", data[:200])
	}
	rc, err := s.ReportCircuit(Request{Values: vals})
	if err != nil {
		t.Fatal(err)
	}
	if rc.Analysis.Distortion.Level.DBm != -20 || len(rc.Overrides) != 2 || s.base.Analysis.Distortion.Level.DBm != -30 {
		t.Errorf("report circuit: level %g, overrides %v; the file's own left at %g", rc.Analysis.Distortion.Level.DBm, rc.Overrides, s.base.Analysis.Distortion.Level.DBm)
	}
}

// TestControls: every demo's sliders span values the file accepts at both
// ends, log where the quantity spans decades, and start at the file's
// values (or the --set ones).
func TestControls(t *testing.T) {
	for _, name := range demos {
		s := newSession(t, name)
		for _, c := range s.controls {
			if !(c.Min <= c.Value && c.Value <= c.Max) || c.Min == c.Max {
				t.Errorf("%s %s: %g outside its slider %g..%g", name, c.Name, c.Value, c.Min, c.Max)
			}
			if c.Name == DriveLevel || c.Name == DriveFrequency {
				continue
			}
			for _, end := range []float64{c.Min, c.Max} {
				text := c.text(end)
				if _, err := s.base.WithOverride(c.Name + "=" + text); err != nil {
					t.Errorf("%s %s: slider end %s refused: %v", name, c.Name, text, err)
				}
			}
		}
	}
	s := newSession(t, "detector", "Rbias.value=47k")
	if c := control(t, s, "Rbias.value"); c.Value != 47e3 || c.FileValue != 220e3 || !c.Log || c.Text != "47k" {
		t.Errorf("Rbias with --set 47k: %+v", c)
	}
	if c := control(t, s, "detector_low_barrier.ideality"); c.Log || c.Text != "1.05" {
		t.Errorf("ideality: %+v", c)
	}
}

// TestSessionPlainCircuits: a circuit without ports still shows its Q
// points and I–V figure and says why the rest is missing; one with ports
// but no distortion defaults takes the plan's signal frequency, and its
// saved file gains a distortion block the loader reads back.
func TestSessionPlainCircuits(t *testing.T) {
	bare := `name: bare
diode_models:
  d: {saturation_current: 10nA, series_resistance: 5}
parts:
  - {type: voltage_source, name: V1, plus: a, minus: gnd, value: 1V}
  - {type: resistor, name: R1, between: [a, b], value: 1k}
  - {type: diode, name: D1, anode: b, cathode: gnd, model: d}
`
	s, err := NewSession("bare.yaml", []byte(bare), nil)
	if err != nil {
		t.Fatal(err)
	}
	v, err := s.Move(context.Background(), Request{Values: startValues(s)})
	if err != nil || v.Failure != "" || v.Errors != nil {
		t.Fatalf("%v %s %v", err, v.Failure, v.Errors)
	}
	if len(v.Figures) != 1 || v.Figures[0].ID != "operating" || tableByID(v.Tables, "qpoints") == nil || !strings.Contains(strings.Join(v.Notes, " "), "no ports") {
		t.Errorf("figures %d, notes %v", len(v.Figures), v.Notes)
	}
	ported := bare + `ports:
  - {name: in, node: b, impedance: 50, coupling: ac}
  - {name: out, node: a, impedance: 50, coupling: ac}
`
	s, err = NewSession("ported.yaml", []byte(ported), nil)
	if err != nil {
		t.Fatal(err)
	}
	if f := control(t, s, DriveFrequency); f.Value != 1e9 {
		t.Errorf("drive frequency %g Hz, want the plan's 1 GHz", f.Value)
	}
	vals := startValues(s)
	vals[DriveLevel] = "-20dBm"
	data, err := s.CircuitFile(Request{Values: vals})
	if err != nil {
		t.Fatal(err)
	}
	c, err := circuit.Parse("saved.yaml", data)
	if err != nil || !c.Analysis.Distortion.Set || c.Analysis.Distortion.Level.DBm != -20 || c.Analysis.Distortion.FrequencyHz != 1e9 {
		t.Errorf("saved: %v\n%s", err, data)
	}
}
