package explore

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"time"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/ac/plan"
	"qpoint/plots"
	"qpoint/plots/report"
	"qpoint/smallsignal"
)

// Progress reports how far a waveform check has got: the stage running,
// and the waveform solves it has done of the total it will (Total is zero
// where the count is not known ahead, as in the validity search).
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

// checkSteady is how the check solves its waveforms: the method the
// distortion command takes by default (harmonic balance or shooting by
// the circuit's size) at its full accuracy.
var checkSteady = ac.SteadySettings{Harmonics: 5, Method: balance.Method{}}

// Check solves the full nonlinear circuit at the request's values, as the
// report's distortion section does: the waveform at the drive beside the
// estimate, with every diode's stress; the validity limit at full
// accuracy; the output against input level; for two tones the mixing
// products; for a detector its transfer curve. progress is called after
// each waveform solve. A newer move cancels it (ctx's error).
func (s *Session) Check(ctx context.Context, req Request, progress func(Progress)) (*CheckView, error) {
	ctx, cancel := s.begin(ctx)
	defer cancel()
	s.mu.Lock()
	defer s.mu.Unlock()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	t0 := time.Now()
	out := &CheckView{}
	vals, errs := s.resolve(req)
	if len(errs) > 0 {
		out.Errors = errs
		return out, nil
	}
	if vals.drive == nil {
		out.Failure = s.driveNote
		return out, nil
	}
	_, nw, err := s.solve(vals.c)
	if err != nil {
		out.Failure = err.Error()
		return out, nil
	}
	if err := s.check(ctx, out, nw, vals.drive, progress); err != nil {
		if ctx.Err() != nil {
			return nil, ctx.Err()
		}
		out.Failure = err.Error()
	}
	out.Seconds = time.Since(t0).Seconds()
	return out, nil
}

func (s *Session) check(ctx context.Context, out *CheckView, nw *smallsignal.Network, d *plan.Drive, progress func(Progress)) error {
	tell := func(stage string, done, total int) {
		if progress != nil {
			progress(Progress{Stage: stage, Done: done, Total: total})
		}
	}
	add := func(id string, f *plots.Figure) error {
		var pt part
		if err := pt.figure(id, f); err != nil {
			return err
		}
		out.Figures = append(out.Figures, pt.figures...)
		return nil
	}
	est, err := ac.Volterra(nw, d.Drive)
	if err != nil {
		return fmt.Errorf("distortion: %w", err)
	}
	one, oneEst := d.OneTone(), est.OneTone()

	tell("waveform", 0, 1)
	st, err := ac.SteadyState(nw, one, checkSteady)
	if err != nil {
		return fmt.Errorf("the waveform at %.1f dBm: %w", d.LevelDBm, err)
	}
	tell("waveform", 1, 1)
	wt, note := report.WaveformTable(st)
	out.Tables = append(out.Tables, table("waveform", wt), table("stress", report.StressTable(st)))
	out.Notes = append(out.Notes, note)
	out.Cautions = append(out.Cautions, st.Cautions()...)
	if err := add("harmonics", plots.HarmonicSpectrum(st, oneEst)); err != nil {
		return err
	}

	if err := ctx.Err(); err != nil {
		return err
	}
	guess := s.limit
	if math.IsNaN(guess) {
		guess = d.LevelDBm
	}
	search := checkSteady
	search.Start = st
	v, err := ac.ValidityNear(ctx, nw, one, ac.ValiditySearch{GuessDBm: guess, TolDB: 0.5,
		LowestDBm: math.Max(-200, d.LevelDBm-100), HighestDBm: math.Min(90, d.LevelDBm+40), Steady: search,
		Progress: func(n int) { tell("validity limit", n, 0) }})
	if err != nil {
		return fmt.Errorf("validity limit: %w", err)
	}
	ct, cnote := report.ComparisonTable(ac.Compare(oneEst, st), v)
	out.Tables = append(out.Tables, table("comparison", ct))
	if cnote != "" {
		out.Notes = append(out.Notes, cnote)
	}
	out.Notes = append(out.Notes, "Small-signal validity at full accuracy: "+v.Note()+".")
	if v.Outcome == ac.LimitFound {
		out.Cards = append(out.Cards, Card{Label: "small-signal limit", Value: fmt.Sprintf("%.2f dBm", v.LevelDBm), Detail: "from the waveform, to 0.05 dB"})
	}

	var levels []float64
	for l := d.LevelDBm - 30; l <= d.LevelDBm+20+1e-9; l += 2 {
		levels = append(levels, l)
	}
	sweep, err := s.levelSweep(ctx, nw, one, levels, "output against level", tell)
	if ctx.Err() != nil {
		return ctx.Err()
	}
	if err != nil {
		out.Notes = append(out.Notes, "The level sweep stopped "+err.Error()+".")
	}
	if len(sweep) > 1 {
		comp, compressed := ac.Compression(sweep, cmplx.Abs(oneEst.Linear)/oneEst.Drive.EMF)
		if err := add("level-sweep", plots.LevelSweep(sweep, oneEst, comp, compressed)); err != nil {
			return err
		}
		if compressed {
			out.Cards = append(out.Cards, Card{Label: "1 dB compression", Value: fmt.Sprintf("%.1f dBm", comp), Detail: "input, from the waveform"})
		}
	}

	if d.SecondToneHz != 0 {
		tell("two tones", 0, 1)
		st2, err := ac.SteadyState(nw, d.Drive, checkSteady)
		if ctx.Err() != nil {
			return ctx.Err()
		}
		if err != nil {
			out.Notes = append(out.Notes, "The two-tone waveform did not converge: "+err.Error()+".")
		} else {
			tell("two tones", 1, 1)
			out.Tables = append(out.Tables, table("two-tone", report.TwoToneTable(st2, est)))
			if err := add("two-tone", plots.TwoToneSpectrum(st2, est)); err != nil {
				return err
			}
		}
	}

	path := ac.NoiseSettings{Input: d.Drive.Input, Output: d.Drive.Output}
	if ac.Detects(nw, path, d.FrequencyHz) {
		n, err := plan.ResolveNoise(nw.Point.Circuit, nw, plan.NoiseRequest{Input: d.InputName, Output: d.OutputName})
		if err != nil {
			return err
		}
		det, err := ac.Detector(nw, path, d.FrequencyHz, n.VideoBandHz[0], n.VideoBandHz[1])
		if err != nil {
			return fmt.Errorf("detector: %w", err)
		}
		var levels []float64
		for l := math.Floor(det.TangentialDBm()/2)*2 - 10; l <= 10+1e-9; l += 2 {
			levels = append(levels, l)
		}
		tsweep, err := s.levelSweep(ctx, nw, one, levels, "detector transfer", tell)
		if ctx.Err() != nil {
			return ctx.Err()
		}
		if err != nil {
			out.Notes = append(out.Notes, "The detector's level sweep stopped "+err.Error()+".")
		}
		if t, err := ac.DetectorTransfer(tsweep, det.Sensitivity); err == nil {
			if err := add("transfer", plots.DetectorTransfer(t, det.TangentialDBm())); err != nil {
				return err
			}
			if !math.IsNaN(t.DeviationDBm) {
				out.Cards = append(out.Cards, Card{Label: "square-law range", Value: fmt.Sprintf("%.1f dB", t.DynamicRangeDB(det.TangentialDBm())),
					Detail: fmt.Sprintf("tangential sensitivity %.1f dBm to 1 dB deviation at %.1f dBm", det.TangentialDBm(), t.DeviationDBm)})
			}
		}
	}
	if len(out.Cautions) == 0 {
		out.Notes = append(out.Notes, fmt.Sprintf("No diode passes a rating or its breakdown knee at %.1f dBm.", d.LevelDBm))
	}
	return nil
}

// levelSweep solves the steady state at each level in turn, each from the
// last (continuation in level, as ac.LevelSweep), checking ctx between
// solves.
func (s *Session) levelSweep(ctx context.Context, nw *smallsignal.Network, d ac.Drive, levels []float64, stage string, tell func(string, int, int)) ([]ac.LevelPoint, error) {
	z0 := nw.Ports[d.Input].Impedance
	var out []ac.LevelPoint
	var prev *ac.Steady
	for i, l := range levels {
		if err := ctx.Err(); err != nil {
			return out, err
		}
		d.EMF = ac.DBmToEMF(l, z0)
		st := checkSteady
		st.Start = prev
		w, err := ac.SteadyState(nw, d, st)
		if err != nil {
			return out, fmt.Errorf("at %.1f dBm: %s", l, strings.TrimSuffix(err.Error(), "."))
		}
		out = append(out, ac.LevelPoint{LevelDBm: l, EMF: d.EMF, Steady: w})
		prev = w
		tell(stage, i+1, len(levels))
	}
	return out, nil
}
