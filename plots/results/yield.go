package results

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"

	"qpoint/ac/yield"
	"qpoint/plots/report"
)

// Yield is `yield --json`, the contract's shape with more keys.
type Yield struct {
	Runs          int                `json:"runs"`
	Seed          uint64             `json:"seed"`
	Passed        int                `json:"passed"`
	Yield         Number             `json:"yield"`
	Interval95    [2]Number          `json:"interval_95"`
	Temperatures  []Number           `json:"temperatures"`
	Targets       []YieldTarget      `json:"targets"`
	Sensitivities []YieldSensitivity `json:"sensitivities"`
	Groups        []YieldGroup       `json:"groups"`
	Tolerances    []YieldTolerance   `json:"tolerances"`
	Cautions      []YieldCaution     `json:"cautions"`
	Stats         YieldStats         `json:"stats"`
}

// YieldTarget is one target's statistics over the runs.
type YieldTarget struct {
	Target       string         `json:"target"`
	Unit         string         `json:"unit"`
	Limit        *Number        `json:"limit"` // null for a target without one
	Bound        string         `json:"bound"` // "above", "below" or "none"
	Mean         Number         `json:"mean"`
	Std          Number         `json:"std"`
	LinearStd    Number         `json:"linear_std"`
	Min          Number         `json:"min"`
	Max          Number         `json:"max"`
	Quantiles    OrderedNumbers `json:"quantiles"`
	PassFraction Number         `json:"pass_fraction"`
	Nominal      Number         `json:"nominal"`
	Readings     int            `json:"readings"`
	Corner       *YieldCorner   `json:"corner,omitempty"`
}

// YieldCorner is the worst-case corner of a target.
type YieldCorner struct {
	Reading Number         `json:"reading"`
	Passes  bool           `json:"passes"`
	Values  OrderedNumbers `json:"values"`
	Error   string         `json:"error,omitempty"`
}

// YieldSensitivity is one value's share of a target's variance.
type YieldSensitivity struct {
	Value        string `json:"value"`
	Target       string `json:"target"`
	Share        Number `json:"share"`
	Coefficient  Number `json:"coefficient"`
	StdDev       Number `json:"std_dev"`
	Contribution Number `json:"contribution"`
}

// YieldGroup is a tolerance group.
type YieldGroup struct {
	Group  string `json:"group"`
	Target string `json:"target"`
	Share  Number `json:"share"`
}

// YieldTolerance is one toleranced value.
type YieldTolerance struct {
	Value        string  `json:"value"`
	Nominal      Number  `json:"nominal"`
	Distribution string  `json:"distribution"` // "uniform", "normal" or "log-normal"
	Width        Number  `json:"width"`        // band, sigma (SI units) or sigma of ln x
	StdDev       Number  `json:"std_dev"`
	Group        *string `json:"group"`
}

// YieldCaution is one of the yield run's typed cautions.
type YieldCaution struct {
	Kind    string `json:"kind"`
	Part    string `json:"part,omitempty"`
	Count   int    `json:"count,omitempty"`
	Message string `json:"message"`
}

// YieldStats is the yield run's record.
type YieldStats struct {
	Failed           int    `json:"failed"`
	Redrawn          int    `json:"redrawn"`
	Evaluations      int    `json:"evaluations"`
	NewtonIterations int    `json:"newton_iterations"`
	Workers          int    `json:"workers"`
	Generator        string `json:"generator"`
	Sensitivity      string `json:"sensitivity"`
	Seconds          Number `json:"seconds"`
}

// YieldOf returns `yield --json` of r.
func YieldOf(r *yield.Result) *Yield {
	c := r.Circuit
	d := &Yield{Runs: len(r.Runs), Seed: r.Settings.Seed, Passed: r.Passed, Yield: Number(r.Yield),
		Interval95: [2]Number{Number(r.Interval[0]), Number(r.Interval[1])},
		Targets:    []YieldTarget{}, Sensitivities: []YieldSensitivity{}, Groups: []YieldGroup{},
		Tolerances: []YieldTolerance{}, Cautions: []YieldCaution{}}
	for _, k := range r.TemperaturesK {
		d.Temperatures = append(d.Temperatures, Number(k))
	}
	corner := map[int]*yield.Corner{}
	for i := range r.Corners {
		corner[r.Corners[i].Target] = &r.Corners[i]
	}
	for ti, ts := range r.Targets {
		tj := YieldTarget{Target: ts.Target.Text, Unit: ts.Target.Measure.Unit, Mean: Number(ts.Mean), Std: Number(ts.Std),
			LinearStd: Number(ts.LinearStd), Min: Number(ts.Min), Max: Number(ts.Max), PassFraction: Number(ts.PassFraction),
			Nominal: Number(ts.Nominal), Readings: ts.Count, Bound: "none"}
		if ts.Target.Bound != yield.Observe {
			l := Number(ts.Target.Limit)
			tj.Limit = &l
			tj.Bound = map[yield.Bound]string{yield.AtLeast: "above", yield.AtMost: "below"}[ts.Target.Bound]
		}
		for q, p := range yield.QuantileLevels {
			tj.Quantiles.Set(formatProbability(p), ts.Quantiles[q])
		}
		if cn := corner[ti]; cn != nil {
			cj := &YieldCorner{Reading: Number(cn.Reading), Passes: cn.Passes}
			for k, v := range cn.Values {
				cj.Values.Set(c.Tolerances[k].Name, v)
			}
			if cn.Err != nil {
				cj.Error = cn.Err.Error()
			}
			tj.Corner = cj
		}
		d.Targets = append(d.Targets, tj)
	}
	for _, s := range r.Sensitivities {
		d.Sensitivities = append(d.Sensitivities, YieldSensitivity{Value: s.Value, Target: r.Targets[s.Target].Target.Text,
			Share: Number(s.Share), Coefficient: Number(s.Coefficient), StdDev: Number(s.StdDev), Contribution: Number(s.Contribution)})
	}
	for _, g := range r.Groups {
		d.Groups = append(d.Groups, YieldGroup{Group: g.Group, Target: r.Targets[g.Target].Target.Text, Share: Number(g.Share)})
	}
	for _, t := range c.Tolerances {
		tj := YieldTolerance{Value: t.Name, Nominal: Number(t.Nominal), Width: Number(t.Width), StdDev: Number(t.StdDev()),
			Distribution: map[int]string{0: "uniform", 1: "normal", 2: "log-normal"}[int(t.Distribution)]}
		if t.Group >= 0 {
			name := c.ToleranceGroups[t.Group].Name
			tj.Group = &name
		}
		d.Tolerances = append(d.Tolerances, tj)
	}
	for _, x := range r.Cautions {
		d.Cautions = append(d.Cautions, YieldCaution{Kind: x.Kind.String(), Part: x.Part, Count: x.Count, Message: x.Message})
	}
	d.Stats = YieldStats{Failed: r.Stats.Failed, Redrawn: r.Stats.Redrawn, Evaluations: r.Stats.Evaluations,
		NewtonIterations: r.Stats.NewtonIterations, Workers: r.Stats.Workers, Generator: r.Stats.Generator,
		Sensitivity: r.Stats.Sensitivity, Seconds: Number(r.Stats.Runtime.Seconds())}
	return d
}

// formatProbability names a quantile's level as a JSON key: "0.001".
func formatProbability(p float64) string {
	return strconv.FormatFloat(p, 'g', -1, 64)
}

// WriteYieldCSV writes one row per run: the drawn values, each target's
// reading at each temperature and its worst, and whether the run passed.
func WriteYieldCSV(w io.Writer, r *yield.Result) error {
	cw := csv.NewWriter(w)
	c := r.Circuit
	header := []string{"run"}
	for _, t := range c.Tolerances {
		header = append(header, t.Name+"_"+report.UnitOrNumber(t.Quantity.Unit()))
	}
	multi := len(r.TemperaturesK) > 1
	for _, ts := range r.Targets {
		u := report.UnitOrNumber(ts.Target.Measure.Unit)
		if multi {
			for _, k := range r.TemperaturesK {
				header = append(header, fmt.Sprintf("%s_%s@%gK", ts.Target.Text, u, k))
			}
		}
		header = append(header, ts.Target.Text+"_"+u)
	}
	header = append(header, "passed", "error")
	if err := cw.Write(header); err != nil {
		return err
	}
	g := func(v float64) string {
		if math.IsNaN(v) {
			return ""
		}
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	nk := len(r.TemperaturesK)
	for i := range r.Runs {
		run := &r.Runs[i]
		row := []string{strconv.Itoa(run.Index)}
		for _, v := range run.Values {
			row = append(row, g(v))
		}
		for t := range r.Targets {
			if multi {
				for k := 0; k < nk; k++ {
					row = append(row, g(run.Readings[t*nk+k]))
				}
			}
			row = append(row, g(run.Worst[t]))
		}
		e := ""
		if run.Err != nil {
			e = run.Err.Error()
		}
		row = append(row, strconv.FormatBool(run.Passed), e)
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
