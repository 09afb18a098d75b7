package main

import (
	"strconv"

	"qpoint/ac/yield"
)

// yieldJSON is `yield --json`, the contract's shape with more keys.
type yieldJSON struct {
	Runs          int                    `json:"runs"`
	Seed          uint64                 `json:"seed"`
	Passed        int                    `json:"passed"`
	Yield         number                 `json:"yield"`
	Interval95    [2]number              `json:"interval_95"`
	Temperatures  []number               `json:"temperatures"`
	Targets       []yieldTargetJSON      `json:"targets"`
	Sensitivities []yieldSensitivityJSON `json:"sensitivities"`
	Groups        []yieldGroupJSON       `json:"groups"`
	Tolerances    []yieldToleranceJSON   `json:"tolerances"`
	Cautions      []yieldCautionJSON     `json:"cautions"`
	Stats         yieldStatsJSON         `json:"stats"`
}

type yieldTargetJSON struct {
	Target       string           `json:"target"`
	Unit         string           `json:"unit"`
	Limit        *number          `json:"limit"` // null for a target without one
	Bound        string           `json:"bound"` // "above", "below" or "none"
	Mean         number           `json:"mean"`
	Std          number           `json:"std"`
	LinearStd    number           `json:"linear_std"`
	Min          number           `json:"min"`
	Max          number           `json:"max"`
	Quantiles    orderedNumbers   `json:"quantiles"`
	PassFraction number           `json:"pass_fraction"`
	Nominal      number           `json:"nominal"`
	Readings     int              `json:"readings"`
	Corner       *yieldCornerJSON `json:"corner,omitempty"`
}

type yieldCornerJSON struct {
	Reading number         `json:"reading"`
	Passes  bool           `json:"passes"`
	Values  orderedNumbers `json:"values"`
	Error   string         `json:"error,omitempty"`
}

type yieldSensitivityJSON struct {
	Value        string `json:"value"`
	Target       string `json:"target"`
	Share        number `json:"share"`
	Coefficient  number `json:"coefficient"`
	StdDev       number `json:"std_dev"`
	Contribution number `json:"contribution"`
}

type yieldGroupJSON struct {
	Group  string `json:"group"`
	Target string `json:"target"`
	Share  number `json:"share"`
}

type yieldToleranceJSON struct {
	Value        string  `json:"value"`
	Nominal      number  `json:"nominal"`
	Distribution string  `json:"distribution"` // "uniform", "normal" or "log-normal"
	Width        number  `json:"width"`        // band, sigma (SI units) or sigma of ln x
	StdDev       number  `json:"std_dev"`
	Group        *string `json:"group"`
}

type yieldCautionJSON struct {
	Kind    string `json:"kind"`
	Part    string `json:"part,omitempty"`
	Count   int    `json:"count,omitempty"`
	Message string `json:"message"`
}

type yieldStatsJSON struct {
	Failed           int    `json:"failed"`
	Redrawn          int    `json:"redrawn"`
	Evaluations      int    `json:"evaluations"`
	NewtonIterations int    `json:"newton_iterations"`
	Workers          int    `json:"workers"`
	Generator        string `json:"generator"`
	Sensitivity      string `json:"sensitivity"`
	Seconds          number `json:"seconds"`
}

func yieldDocument(r *yield.Result) *yieldJSON {
	c := r.Circuit
	d := &yieldJSON{Runs: len(r.Runs), Seed: r.Settings.Seed, Passed: r.Passed, Yield: number(r.Yield),
		Interval95: [2]number{number(r.Interval[0]), number(r.Interval[1])},
		Targets:    []yieldTargetJSON{}, Sensitivities: []yieldSensitivityJSON{}, Groups: []yieldGroupJSON{},
		Tolerances: []yieldToleranceJSON{}, Cautions: []yieldCautionJSON{}}
	for _, k := range r.TemperaturesK {
		d.Temperatures = append(d.Temperatures, number(k))
	}
	corner := map[int]*yield.Corner{}
	for i := range r.Corners {
		corner[r.Corners[i].Target] = &r.Corners[i]
	}
	for ti, ts := range r.Targets {
		tj := yieldTargetJSON{Target: ts.Target.Text, Unit: ts.Target.Measure.Unit, Mean: number(ts.Mean), Std: number(ts.Std),
			LinearStd: number(ts.LinearStd), Min: number(ts.Min), Max: number(ts.Max), PassFraction: number(ts.PassFraction),
			Nominal: number(ts.Nominal), Readings: ts.Count, Bound: "none"}
		if ts.Target.Bound != yield.Observe {
			l := number(ts.Target.Limit)
			tj.Limit = &l
			tj.Bound = map[yield.Bound]string{yield.AtLeast: "above", yield.AtMost: "below"}[ts.Target.Bound]
		}
		for q, p := range yield.QuantileLevels {
			tj.Quantiles.set(formatProbability(p), ts.Quantiles[q])
		}
		if cn := corner[ti]; cn != nil {
			cj := &yieldCornerJSON{Reading: number(cn.Reading), Passes: cn.Passes}
			for k, v := range cn.Values {
				cj.Values.set(c.Tolerances[k].Name, v)
			}
			if cn.Err != nil {
				cj.Error = cn.Err.Error()
			}
			tj.Corner = cj
		}
		d.Targets = append(d.Targets, tj)
	}
	for _, s := range r.Sensitivities {
		d.Sensitivities = append(d.Sensitivities, yieldSensitivityJSON{Value: s.Value, Target: r.Targets[s.Target].Target.Text,
			Share: number(s.Share), Coefficient: number(s.Coefficient), StdDev: number(s.StdDev), Contribution: number(s.Contribution)})
	}
	for _, g := range r.Groups {
		d.Groups = append(d.Groups, yieldGroupJSON{Group: g.Group, Target: r.Targets[g.Target].Target.Text, Share: number(g.Share)})
	}
	for _, t := range c.Tolerances {
		tj := yieldToleranceJSON{Value: t.Name, Nominal: number(t.Nominal), Width: number(t.Width), StdDev: number(t.StdDev()),
			Distribution: map[int]string{0: "uniform", 1: "normal", 2: "log-normal"}[int(t.Distribution)]}
		if t.Group >= 0 {
			name := c.ToleranceGroups[t.Group].Name
			tj.Group = &name
		}
		d.Tolerances = append(d.Tolerances, tj)
	}
	for _, x := range r.Cautions {
		d.Cautions = append(d.Cautions, yieldCautionJSON{Kind: x.Kind.String(), Part: x.Part, Count: x.Count, Message: x.Message})
	}
	d.Stats = yieldStatsJSON{Failed: r.Stats.Failed, Redrawn: r.Stats.Redrawn, Evaluations: r.Stats.Evaluations,
		NewtonIterations: r.Stats.NewtonIterations, Workers: r.Stats.Workers, Generator: r.Stats.Generator,
		Sensitivity: r.Stats.Sensitivity, Seconds: number(r.Stats.Runtime.Seconds())}
	return d
}

// formatProbability names a quantile's level as a JSON key: "0.001".
func formatProbability(p float64) string {
	return strconv.FormatFloat(p, 'g', -1, 64)
}
