package report

import (
	"fmt"
	"io"
	"strings"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
)

// WriteResponse writes the header and the response at up to rows of the
// sweep's frequencies grid; r holds either every point or just those rows
// (PickRows, as a streamed sweep keeps them).
func WriteResponse(w io.Writer, c *circuit.Circuit, p *bias.Point, r *ac.Response, grid []float64, rows int) {
	fmt.Fprintf(w, "%s\n", c.Name)
	fmt.Fprintf(w, "  file         %s\n", c.File)
	fmt.Fprintf(w, "  bias         %s\n", BiasLine(p))
	var ports []string
	for _, port := range r.Ports {
		ports = append(ports, fmt.Sprintf("%s (%s)", port.Name, si.Format(port.Impedance, "Ω", 4)))
	}
	fmt.Fprintf(w, "  ports        %s\n", strings.Join(ports, ", "))
	first, last := grid[0], grid[len(grid)-1]
	fmt.Fprintf(w, "  sweep        %d points, %s to %s\n", len(grid), si.Format(first, "Hz", 4), si.Format(last, "Hz", 4))
	if len(c.Distributed) > 0 {
		fmt.Fprintf(w, "  lines        %s\n", LineSummary(LineParts(c, plan.DesignFrequency(c))))
		fmt.Fprintf(w, "  solved by    %s: %s\n", r.Stats.Engine, "lines and blocks are not G + sC, so every point is factored")
	}

	ResponseTable(r, rows).WriteText(w)
	name1 := r.Ports[0].Name
	if len(r.Probes) > 0 {
		fmt.Fprintf(w, "  probes: node voltage for a 1 V (peak) EMF behind port %s's reference impedance, in dB re 1 V\n", name1)
	}
	fmt.Fprintln(w)
}
