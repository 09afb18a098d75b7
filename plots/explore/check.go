package explore

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"time"

	"qpoint/ac/balance"
	"qpoint/ac/mixer"
	"qpoint/ac/plan"
	"qpoint/ac/steady"
	"qpoint/bias/circuit"
	"qpoint/plots"
	"qpoint/plots/report"
	"qpoint/smallsignal"
)

// Progress reports how far a waveform check has got: the stage running,
// and the waveform solves it has done of the total it will (Total is zero
// where the count is not known ahead).
type Progress struct {
	Stage string `json:"stage"`
	Done  int    `json:"done"`
	Total int    `json:"total"`
}

// CheckView is what a waveform check shows.
type CheckView struct {
	Cards    []Card            `json:"cards,omitempty"`
	Tables   []Table           `json:"tables,omitempty"`
	Figures  []Figure          `json:"figures,omitempty"`
	Notes    []string          `json:"notes,omitempty"`
	Cautions []string          `json:"cautions,omitempty"`
	Errors   map[string]string `json:"errors,omitempty"`
	Failure  string            `json:"failure,omitempty"`
	Seconds  float64           `json:"seconds"`
}

// Check runs the distortion analysis the report runs (plan.RunDistortion
// with the report's request) at the request's values: the waveform at the
// drive beside the estimate, with every diode's stress; the validity
// limit; the output against level from 30 dB below the drive to 20 dB
// above; a detector's transfer curve; and, when the drive has a second
// tone, the waveform under both tones at the drive's level; and, for a
// file with a mixer analysis, the mixer under its LO as the report shows
// it (conversion loss, ports, LO, diodes, noise, the shooting check).
// progress is called as the stages go. A newer move or check makes it
// stale: Check then returns ctx's error at once, and the run it started,
// which takes no context, ends in the background without being shown.
func (s *Session) Check(ctx context.Context, req Request, progress func(Progress)) (*CheckView, error) {
	ctx, cancel := s.begin(ctx)
	defer cancel()
	t0 := time.Now()
	out := &CheckView{}
	s.mu.Lock()
	if err := ctx.Err(); err != nil {
		s.mu.Unlock()
		return nil, err
	}
	vals, errs := s.resolve(req)
	var nw *smallsignal.Network
	var err error
	if len(errs) == 0 && vals.drive != nil {
		_, nw, err = s.solve(vals.c, nil)
	}
	s.mu.Unlock()
	switch {
	case len(errs) > 0:
		out.Errors = errs
		return out, nil
	case vals.drive == nil:
		out.Failure = s.driveNote
		return out, nil
	case err != nil:
		out.Failure = err.Error()
		return out, nil
	}
	tell := func(p Progress) {
		if progress != nil {
			progress(p)
		}
	}
	d := vals.drive
	var levels []float64
	for l := d.LevelDBm - 30; l <= d.LevelDBm+20+1e-9; l += 2 {
		levels = append(levels, l)
	}
	// The distortion command's default method (auto): shooting for a
	// small circuit under one tone, harmonic balance for two tones, for
	// large circuits and where lines need it.
	settings := steady.Settings{Harmonics: 5, Method: balance.Method{}}
	// The two-tone waveform is solved at the drive's level alone: the
	// plan's TwoTone would also sweep both tones over the levels, which
	// takes the mixer demo ten seconds.
	r := plan.DistortionRequest{Waveform: settings, Sweep: settings, Validity: true, Levels: levels,
		Progress: func(stage string, n int) (func(done, total int), func()) {
			tell(Progress{Stage: stage, Total: n})
			return func(done, total int) { tell(Progress{Stage: stage, Done: done, Total: total}) }, func() {}
		}}
	tell(Progress{Stage: "waveform and validity limit"})
	type result struct {
		res *plan.Distortion
		err error
		mx  *mixerRun
	}
	done := make(chan result, 1)
	go func() {
		defer func() {
			if p := recover(); p != nil {
				done <- result{err: fmt.Errorf("internal error: %v", p)}
			}
		}()
		res, err := plan.RunDistortion(nw, d, r)
		if err == nil && d.SecondToneHz != 0 {
			tell(Progress{Stage: "two tones"})
			if res.TwoTone, err = steady.Solve(nw, d.Drive, settings); err != nil {
				err = &plan.WaveformError{What: "two-tone waveform", LevelDBm: d.LevelDBm, Err: err}
			}
		}
		var mx *mixerRun
		if vals.c.Analysis.Mixer.Set {
			tell(Progress{Stage: "mixer under its LO"})
			mx = runMixer(vals.c, nw)
		}
		done <- result{res, err, mx}
	}()
	var got result
	select {
	case got = <-done:
	case <-ctx.Done():
		return nil, ctx.Err()
	}
	if err := s.checkView(out, d, got.res, got.err); err != nil {
		out.Failure = err.Error()
	}
	got.mx.view(out)
	out.Seconds = time.Since(t0).Seconds()
	return out, nil
}

// checkView lays a distortion run out as the check shows it, with the
// report's tables and figures.
func (s *Session) checkView(out *CheckView, d *plan.Drive, res *plan.Distortion, err error) error {
	var werr *plan.WaveformError
	switch {
	case res == nil:
		return err
	case errors.As(err, &werr) && res.Waveform == nil:
		return fmt.Errorf("the waveform did not converge at %.1f dBm: %w", d.LevelDBm, werr.Err)
	case errors.As(err, &werr):
		out.Notes = append(out.Notes, err.Error())
	case err != nil:
		return err
	}
	add := func(id string, f *plots.Figure) error {
		var pt part
		if err := pt.figure(id, f); err != nil {
			return err
		}
		out.Figures = append(out.Figures, pt.figures...)
		return nil
	}
	st := res.Waveform
	wt, note := report.WaveformTable(st)
	out.Tables = append(out.Tables, table("waveform", wt), table("stress", report.StressTable(st)))
	out.Notes = append(out.Notes, note)
	out.Cautions = append(out.Cautions, st.Cautions()...)
	ct, cnote := report.ComparisonTable(res.Comparison, res.Validity)
	out.Tables = append(out.Tables, table("comparison", ct))
	if cnote != "" {
		out.Notes = append(out.Notes, cnote)
	}
	if v := res.Validity; v != nil {
		if v.Outcome == steady.LimitFound {
			out.Cards = append(out.Cards, Card{Label: "small-signal limit", Value: fmt.Sprintf("%.2f dBm", v.LevelDBm), Detail: "from the waveform, to 0.05 dB"})
		}
	} else if res.ValidityErr != nil {
		out.Notes = append(out.Notes, "The validity limit could not be searched: "+res.ValidityErr.Error())
	}
	if res.SweepErr != nil {
		out.Notes = append(out.Notes, "The level sweep stopped "+strings.TrimSuffix(res.SweepErr.Error(), ".")+".")
	}
	if cs := report.SweepCautions(res.Sweep); len(cs) > 0 {
		out.Notes = append(out.Notes, "Over the level sweep: "+strings.Join(cs, "; ")+".")
	}
	for i, f := range report.DistortionFigures(res.OneTone, st, res.Sweep, res.CompressionDBm, res.Compressed) {
		if err := add([]string{"harmonics", "level-sweep"}[min(i, 1)], f); err != nil {
			return err
		}
	}
	if res.Compressed {
		out.Cards = append(out.Cards, Card{Label: "1 dB compression", Value: fmt.Sprintf("%.1f dBm", res.CompressionDBm), Detail: "input, from the waveform"})
	}
	if res.TwoTone != nil {
		out.Tables = append(out.Tables, table("two-tone", report.TwoToneTable(res.TwoTone, res.Estimate)))
		if err := add("two-tone", plots.TwoToneSpectrum(res.TwoTone, res.Estimate)); err != nil {
			return err
		}
	}
	if t := res.Transfer; t != nil {
		if err := add("transfer", plots.DetectorTransfer(t, res.TangentialDBm)); err != nil {
			return err
		}
		if !math.IsNaN(t.DeviationDBm) && !math.IsNaN(res.TangentialDBm) {
			out.Cards = append(out.Cards, Card{Label: "square-law range", Value: fmt.Sprintf("%.1f dB", t.DynamicRangeDB(res.TangentialDBm)),
				Detail: fmt.Sprintf("tangential sensitivity %.1f dBm to 1 dB deviation at %.1f dBm", res.TangentialDBm, t.DeviationDBm)})
		}
	}
	if len(out.Cautions) == 0 {
		out.Notes = append(out.Notes, fmt.Sprintf("No diode passes a rating or its breakdown knee at %.1f dBm.", d.LevelDBm))
	}
	return nil
}

// mixerRun is the mixer under its LO at the check's values.
type mixerRun struct {
	nw   *smallsignal.Network
	plan *plan.Mixer
	res  *mixer.Result
	err  error
}

// runMixer analyses the file's mixer at nw, with the shooting check, as
// the report does. A pump past a breakdown knee is analysed and shown
// with its caution.
func runMixer(c *circuit.Circuit, nw *smallsignal.Network) *mixerRun {
	m, err := plan.ResolveMixer(c, plan.MixerRequest{CheckShooting: true, AllowBreakdown: true})
	if err != nil {
		return &mixerRun{err: err}
	}
	r, err := mixer.Analyze(nw, m.Settings)
	return &mixerRun{nw: nw, plan: m, res: r, err: err}
}

// view adds the mixer's cards, tables and cautions to out; a failed
// analysis is a note.
func (m *mixerRun) view(out *CheckView) {
	switch {
	case m == nil:
		return
	case m.res == nil:
		out.Notes = append(out.Notes, "The mixer under its LO could not be analysed: "+m.err.Error())
		return
	}
	for _, c := range report.MixerCards(m.plan, m.res) {
		out.Cards = append(out.Cards, Card{Label: c.Label, Value: c.Value, Detail: c.Detail})
	}
	out.Tables = append(out.Tables, table("mixer", report.MixerTable(m.res)), table("mixer-ports", report.MixerPortTable(m.nw, m.plan, m.res)),
		table("mixer-lo", report.MixerLOTable(m.plan, m.res)), table("mixer-diodes", report.MixerDiodeTable(m.res)),
		table("mixer-noise", report.MixerNoiseTable(m.res, 6)))
	out.Notes = append(out.Notes, "The mixer: "+report.MixerMethodLine(m.res)+".")
	out.Cautions = append(out.Cautions, report.MixerCautionMessages(m.res)...)
}
