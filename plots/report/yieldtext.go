package report

import (
	"fmt"
	"io"

	"qpoint/ac/yield"
)

// WriteYield writes a yield run as text: the runs, the yield with its
// confidence interval, the targets, sensitivities, corners and cautions.
func WriteYield(w io.Writer, r *yield.Result) {
	c := r.Circuit
	fmt.Fprintf(w, "%s\n", c.Name)
	fmt.Fprintf(w, "  file         %s\n", c.File)
	WriteOverrides(w, c)
	fmt.Fprintf(w, "  runs         %d, seed %d, %d workers, in %s\n", len(r.Runs), r.Settings.Seed, r.Stats.Workers, r.Stats.Runtime.Round(1e6))
	fmt.Fprintf(w, "  temperatures %s\n", TemperatureList(r.TemperaturesK))
	fmt.Fprintf(w, "  tolerances   %d values, %d groups; %d analyses, %d Newton iterations\n",
		len(c.Tolerances), len(c.ToleranceGroups), r.Stats.Evaluations, r.Stats.NewtonIterations)
	limited := false
	for _, t := range r.Settings.Targets {
		limited = limited || t.Bound != yield.Observe
	}
	if limited {
		fmt.Fprintf(w, "\nYield %s: %d of %d runs meet every target (95 %% interval %s to %s, Wilson score)\n",
			PercentOf(r.Yield), r.Passed, len(r.Runs), PercentOf(r.Interval[0]), PercentOf(r.Interval[1]))
	}
	YieldTargetTable(r).WriteText(w)
	YieldShareTable(r).WriteText(w)
	if len(r.Corners) > 0 {
		YieldCornerTable(r).WriteText(w)
	}
	if len(r.Cautions) > 0 {
		fmt.Fprintln(w)
		for _, x := range r.Cautions {
			fmt.Fprintf(w, "  ! %s\n", x.Message)
		}
	}
	fmt.Fprintln(w)
}
