package results

import (
	"io"

	"qpoint/ac"
	"qpoint/ac/touchstone"
	"qpoint/bias/circuit"
	"qpoint/plots/report"
	"qpoint/smallsignal"
)

// ResponseOutputs are the streams a response sweep's points go to as
// they come: its CSV file, its Touchstone file and its JSON document. A
// nil writer is not written.
type ResponseOutputs struct {
	CSV, Touchstone, JSON io.Writer
	// Format is the Touchstone file's number format.
	Format touchstone.Format
	// Rows is how many points, spread over the sweep, the response keeps
	// for its table (report.PickRows).
	Rows int
}

// ResponseStream is a response sweep whose points go to its outputs as
// they come and are not kept, but for a table's rows: the memory a sweep
// takes does not grow with its length. Sweep runs it; Close ends the
// outputs; Response holds what was kept.
type ResponseStream struct {
	nw       *smallsignal.Network
	grid     []float64
	settings ac.Settings
	r        *ac.Response
	keep     map[int]bool
	csv      *ResponseCSV
	ts       *touchstone.Writer
	json     *ResponseWriter
}

// NewResponseStream starts each output that has a writer (its header)
// for a sweep of c's network nw over grid with the reference impedances
// ref (nil for the ports' own).
func NewResponseStream(c *circuit.Circuit, nw *smallsignal.Network, grid, ref []float64, o ResponseOutputs) (*ResponseStream, error) {
	r := &ac.Response{Probes: c.Probes}
	for i, p := range nw.Ports {
		z := p.Impedance
		if ref != nil {
			z = ref[i]
		}
		r.Ports = append(r.Ports, ac.PortInfo{Name: p.Name, Impedance: z})
	}
	s := &ResponseStream{nw: nw, grid: grid, settings: ac.Settings{Reference: ref}, r: r, keep: map[int]bool{}}
	for _, i := range report.PickRows(len(grid), o.Rows) {
		s.keep[i] = true
	}
	var err error
	if o.CSV != nil {
		if s.csv, err = NewResponseCSV(o.CSV, r.Ports, r.Probes); err != nil {
			return nil, err
		}
	}
	if o.Touchstone != nil {
		if s.ts, err = touchstone.NewWriter(o.Touchstone, touchstonePorts(r.Ports), o.Format, touchstoneComment(c), len(grid)); err != nil {
			return nil, err
		}
	}
	if o.JSON != nil {
		if s.json, err = NewResponseWriter(o.JSON, r.Ports, LinePartsOf(c, nil)); err != nil {
			return nil, err
		}
	}
	return s, nil
}

// Sweep runs the sweep, writing every point to the outputs. Its error is
// the sweep's, or the first output's that failed.
func (s *ResponseStream) Sweep() error {
	k := 0
	var ws ac.Workspace
	_, _, err := ws.Sweep(s.nw, s.grid, s.settings, func(pt ac.Point) error {
		if s.keep[k] {
			s.r.Points = append(s.r.Points, pt)
		}
		k++
		return s.write(pt)
	})
	if err != nil {
		return err
	}
	s.r.Stats = ws.SweepStats()
	return nil
}

// write sends one point to every output: JSON, CSV, Touchstone.
func (s *ResponseStream) write(pt ac.Point) error {
	if s.json != nil {
		if err := s.json.Write(pt, s.r.Probes); err != nil {
			return err
		}
	}
	if s.csv != nil {
		if err := s.csv.Write(pt); err != nil {
			return err
		}
	}
	if s.ts != nil {
		return s.ts.Write(touchstone.Point{FrequencyHz: pt.FrequencyHz, S: pt.S})
	}
	return nil
}

// Close ends every output: the JSON document's stats, the buffered CSV,
// the Touchstone file's check of its point count.
func (s *ResponseStream) Close() error {
	if s.json != nil {
		if err := s.json.Close(s.r.Stats); err != nil {
			return err
		}
	}
	if s.csv != nil {
		if err := s.csv.Close(); err != nil {
			return err
		}
	}
	if s.ts != nil {
		return s.ts.Close()
	}
	return nil
}

// Response is the sweep's ports, probes and statistics with the points
// kept for the table.
func (s *ResponseStream) Response() *ac.Response { return s.r }

// WriteTouchstone writes a whole response of c as a Touchstone file.
func WriteTouchstone(w io.Writer, c *circuit.Circuit, r *ac.Response, f touchstone.Format) error {
	pts := make([]touchstone.Point, len(r.Points))
	for i, p := range r.Points {
		pts[i] = touchstone.Point{FrequencyHz: p.FrequencyHz, S: p.S}
	}
	return touchstone.Write(w, touchstonePorts(r.Ports), pts, f, touchstoneComment(c))
}

// touchstonePorts gives a sweep's ports as the file format names them.
func touchstonePorts(ports []ac.PortInfo) []touchstone.Port {
	out := make([]touchstone.Port, len(ports))
	for i, p := range ports {
		out[i] = touchstone.Port{Name: p.Name, Impedance: p.Impedance}
	}
	return out
}

// touchstoneComment is the comment a Touchstone file of c opens with.
func touchstoneComment(c *circuit.Circuit) []string {
	return []string{"circuit: " + c.Name, "file: " + c.File}
}

// MaxHeldSweepBytes bounds the memory a sweep held whole (for figures)
// may take, so that every documented input stays within about 1 GB.
const MaxHeldSweepBytes = 400 << 20

// HeldSweepBytes estimates the memory of points held sweep points of a
// network with the given ports and probes: the S-matrix, the input
// impedances and probe voltages (16 bytes each), their slice headers and
// the point itself, and what the figures derive from each.
func HeldSweepBytes(points, ports, probes int) int {
	perPoint := 16*(ports*ports+ports+probes) + 24*(ports+3) + 64 + 200
	return points * perPoint
}
