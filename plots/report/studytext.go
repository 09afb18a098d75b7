package report

import (
	"fmt"
	"io"
	"math"
	"strings"
	"time"

	"qpoint/ac/plan"
	"qpoint/ac/study"
	"qpoint/plots"
)

// WriteStudy writes a study as text: the circuit, what was varied in how
// many steps and how long, the steps that failed, and the table.
func WriteStudy(w io.Writer, r *study.Result, cols []StudyColumn, elapsed time.Duration, failed int) {
	c := r.Circuit
	fmt.Fprintf(w, "%s\n", c.Name)
	fmt.Fprintf(w, "  file         %s\n", c.File)
	WriteOverrides(w, c)
	what := r.Settings.Axis.Vary.Text
	if r.Settings.Second != nil {
		n2, _ := AxisHeader(r.Settings.Second, r.Settings.SecondIsFrequency)
		what += " × " + n2
	}
	fmt.Fprintf(w, "  study        %s, %d steps in %s, %d Newton iterations\n", what, len(r.Steps), elapsed.Round(time.Millisecond), r.Newton)
	if failed > 0 {
		fmt.Fprintf(w, "  ! %d steps could not be solved; their rows are blank\n", failed)
	}
	StudyTable(r, cols).WriteText(w)
	warned := map[string]bool{}
	for i := range r.Steps {
		for _, x := range r.Steps[i].Warnings {
			key := x.Part + x.Kind.String()
			if !warned[key] {
				warned[key] = true
				fmt.Fprintf(w, "  ! %s at %s = %s: %s\n", x.Part, r.Settings.Axis.Vary.Text, FormatCell(r.Steps[i].Values[0], r.Settings.Axis.Vary.Quantity.Unit()), x.Message)
			}
		}
	}
	fmt.Fprintln(w)
}

// WriteSolution writes where a study met its target, or its optimum.
func WriteSolution(w io.Writer, s *plan.Study, r *study.Result, sol *study.Solution) {
	unit := r.Settings.Axis.Vary.Quantity.Unit()
	what := r.Settings.Axis.Vary.Text
	switch studyGoals[s.Goal] {
	case "target":
		fmt.Fprintf(w, "Target %s = %g %s\n", s.Measure.Text, s.Value, s.Measure.Unit)
		fmt.Fprintf(w, "  met at %s = %s (bracket %s to %s, tolerance %s, %d refinements); %s there is %.6g %s\n",
			what, FormatCell(sol.Value, unit), FormatCell(sol.Bracket[0], unit), FormatCell(sol.Bracket[1], unit),
			FormatDifference(sol.Tolerance, unit), sol.Iterations, s.Measure.Text, sol.Measure, s.Measure.Unit)
	default:
		of := s.Measure.Text
		if sol.OnMagnitude {
			of = "|" + of + "| (its sign is the polarity; --signed uses the signed value)"
		}
		fmt.Fprintf(w, "%s of %s\n", map[string]string{"maximize": "Largest", "minimize": "Smallest"}[studyGoals[s.Goal]], of)
		fmt.Fprintf(w, "  %.6g %s at %s = %s (searched %s to %s, tolerance %s)\n", sol.Measure, s.Measure.Unit, what,
			FormatCell(sol.Value, unit), FormatCell(sol.Bracket[0], unit), FormatCell(sol.Bracket[1], unit), FormatDifference(sol.Tolerance, unit))
		if sol.AtEdge {
			fmt.Fprintf(w, "  ! the best value lies at the end of the range; widen it to see whether it improves further\n")
		}
	}
	fmt.Fprintln(w)
}

// SolutionMarks marks a target's or optimum's solution on the study
// figure.
func SolutionMarks(s *plan.Study, sol *study.Solution) []plots.StudyMark {
	if sol == nil || s.Measure == nil {
		return nil
	}
	mk := plots.StudyMark{Measure: s.Measure, X: sol.Value, Y: sol.Measure, Target: math.NaN()}
	val := FormatMeasure(sol.Measure, s.Measure.Unit)
	switch studyGoals[s.Goal] {
	case "target":
		mk.Target = s.Value
		mk.Label = "target met\n" + val
	case "maximize":
		mk.Label = "largest\n" + val
	default:
		mk.Label = "smallest\n" + val
	}
	if sol.OnMagnitude {
		mk.Label = strings.Replace(mk.Label, "\n", " magnitude\n", 1)
	}
	return []plots.StudyMark{mk}
}

// studyGoals name the goals as the text says them.
var studyGoals = map[plan.GoalKind]string{plan.Target: "target", plan.Maximize: "maximize", plan.Minimize: "minimize"}
