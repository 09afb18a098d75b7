package results

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"qpoint/ac"
	"qpoint/bias/circuit"
)

// WriteResponseCSV writes one row per frequency with a header naming each
// column and its unit.
func WriteResponseCSV(w io.Writer, r *ac.Response) error {
	rw, err := NewResponseCSV(w, r.Ports, r.Probes)
	if err != nil {
		return err
	}
	for _, pt := range r.Points {
		if err := rw.Write(pt); err != nil {
			return err
		}
	}
	return rw.Close()
}

// ResponseCSV writes a response as CSV a point at a time.
type ResponseCSV struct {
	cw  *csv.Writer
	row []string
}

// NewResponseCSV writes the Header: the frequency, each S-parameter's
// parts, each port's input impedance, each probe's voltage and the group
// delay, with units.
func NewResponseCSV(w io.Writer, ports []ac.PortInfo, probes []string) (*ResponseCSV, error) {
	cw := csv.NewWriter(w)
	header := []string{"frequency_Hz"}
	n := len(ports)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			header = append(header, fmt.Sprintf("S%d%d_re", i+1, j+1), fmt.Sprintf("S%d%d_im", i+1, j+1))
		}
	}
	for i := 0; i < n; i++ {
		header = append(header, fmt.Sprintf("Zin%d_re_ohm", i+1), fmt.Sprintf("Zin%d_im_ohm", i+1))
	}
	for _, p := range probes {
		header = append(header, fmt.Sprintf("probe_%s_re_V", p), fmt.Sprintf("probe_%s_im_V", p))
	}
	header = append(header, "group_delay_s")
	return &ResponseCSV{cw: cw}, cw.Write(header)
}

func (rw *ResponseCSV) Write(pt ac.Point) error {
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	row := append(rw.row[:0], g(pt.FrequencyHz))
	for i := range pt.S {
		for _, s := range pt.S[i] {
			row = append(row, g(real(s)), g(imag(s)))
		}
	}
	for _, z := range pt.InputImpedance {
		row = append(row, g(real(z)), g(imag(z)))
	}
	for _, v := range pt.Probes {
		row = append(row, g(real(v)), g(imag(v)))
	}
	row = append(row, g(pt.GroupDelay))
	rw.row = row
	return rw.cw.Write(row)
}

func (rw *ResponseCSV) Close() error {
	rw.cw.Flush()
	return rw.cw.Error()
}

// Complex encodes a complex number as [re, im], or null when either
// part is not finite.
type Complex complex128

func (c Complex) MarshalJSON() ([]byte, error) {
	re, im := real(c), imag(c)
	if math.IsNaN(re) || math.IsInf(re, 0) || math.IsNaN(im) || math.IsInf(im, 0) {
		return []byte("null"), nil
	}
	return []byte("[" + strconv.FormatFloat(re, 'g', -1, 64) + "," + strconv.FormatFloat(im, 'g', -1, 64) + "]"), nil
}

// OrderedComplex is a JSON object of complex numbers that keeps its keys in the order given.
type OrderedComplex struct {
	keys   []string
	values []Complex
}

func (o OrderedComplex) MarshalJSON() ([]byte, error) {
	var b strings.Builder
	b.WriteByte('{')
	for i, k := range o.keys {
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteString(strconv.Quote(k))
		b.WriteByte(':')
		v, _ := o.values[i].MarshalJSON()
		b.Write(v)
	}
	b.WriteByte('}')
	return []byte(b.String()), nil
}

// ResponsePoint is the response at one frequency.
type ResponsePoint struct {
	Frequency      Number         `json:"frequency"`
	S              [][]Complex    `json:"s"`
	InputImpedance []Complex      `json:"input_impedance"`
	Probes         OrderedComplex `json:"probes"`
	GroupDelay     Number         `json:"group_delay"`
}

// Port is a port and its reference impedance.
type Port struct {
	Name      string `json:"name"`
	Impedance Number `json:"impedance"`
}

// Response is `response --json`.
type Response struct {
	Ports       []Port          `json:"ports"`
	Distributed []LinePart      `json:"distributed,omitempty"`
	Points      []ResponsePoint `json:"points"`
	Solver      *Solver         `json:"solver"`
}

// ResponseOf returns the response document of r, swept on circuit c.
func ResponseOf(r *ac.Response, c *circuit.Circuit) *Response {
	d := &Response{Solver: SolverOf(r.Stats), Distributed: LinePartsOf(c, nil)}
	for _, p := range r.Ports {
		d.Ports = append(d.Ports, Port{p.Name, Number(p.Impedance)})
	}
	for _, pt := range r.Points {
		j := ResponsePoint{Frequency: Number(pt.FrequencyHz), GroupDelay: Number(pt.GroupDelay)}
		j.S, j.InputImpedance, j.Probes = networkJSON(pt.S, pt.InputImpedance, r.Probes, pt.Probes)
		d.Points = append(d.Points, j)
	}
	return d
}

// networkJSON converts an S-matrix, input impedances and probe voltages to
// their JSON forms.
func networkJSON(s [][]complex128, zin []complex128, probeNames []string, probes []complex128) ([][]Complex, []Complex, OrderedComplex) {
	var js [][]Complex
	for _, row := range s {
		var jr []Complex
		for _, v := range row {
			jr = append(jr, Complex(v))
		}
		js = append(js, jr)
	}
	var jz []Complex
	for _, z := range zin {
		jz = append(jz, Complex(z))
	}
	var jp OrderedComplex
	for k, name := range probeNames {
		if k < len(probes) {
			jp.keys = append(jp.keys, name)
			jp.values = append(jp.values, Complex(probes[k]))
		}
	}
	return js, jz, jp
}

// ResponseWriter writes the response document a point at a time, the
// same document ResponseOf builds whole.
type ResponseWriter struct {
	w      *bufio.Writer
	points int
}

// NewResponseWriter starts the response document on w; its Write adds a point and Close ends it.
func NewResponseWriter(w io.Writer, ports []ac.PortInfo, lines []LinePart) (*ResponseWriter, error) {
	var js []Port
	for _, p := range ports {
		js = append(js, Port{p.Name, Number(p.Impedance)})
	}
	head, err := json.MarshalIndent(js, "  ", "  ")
	if err != nil {
		return nil, err
	}
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "{\n  \"ports\": %s,", head)
	if len(lines) > 0 {
		dist, err := json.MarshalIndent(lines, "  ", "  ")
		if err != nil {
			return nil, err
		}
		fmt.Fprintf(bw, "\n  \"distributed\": %s,", dist)
	}
	fmt.Fprintf(bw, "\n  \"points\": [")
	return &ResponseWriter{w: bw}, nil
}

func (jw *ResponseWriter) Write(pt ac.Point, probes []string) error {
	j := ResponsePoint{Frequency: Number(pt.FrequencyHz), GroupDelay: Number(pt.GroupDelay)}
	j.S, j.InputImpedance, j.Probes = networkJSON(pt.S, pt.InputImpedance, probes, pt.Probes)
	b, err := json.MarshalIndent(j, "    ", "  ")
	if err != nil {
		return err
	}
	sep := ",\n    "
	if jw.points == 0 {
		sep = "\n    "
	}
	jw.points++
	jw.w.WriteString(sep)
	_, err = jw.w.Write(b)
	return err
}

func (jw *ResponseWriter) Close(st ac.Stats) error {
	if jw.points > 0 {
		jw.w.WriteString("\n  ")
	}
	solver, err := json.MarshalIndent(SolverOf(st), "  ", "  ")
	if err != nil {
		return err
	}
	fmt.Fprintf(jw.w, "],\n  \"solver\": %s\n}\n", solver)
	return jw.w.Flush()
}

// Solver says which engine solved a sweep's points: "LU" or the
// reduction form, the points each took, and the forms tried and refused
// by their accuracy check.
type Solver struct {
	Engine        string   `json:"engine"`
	ReducedPoints int      `json:"reduced_points"`
	LUPoints      int      `json:"lu_points"`
	Refused       []string `json:"refused"`
	// Elements names the lines and blocks that kept the sweep on the LU.
	Elements []string `json:"elements,omitempty"`
}

// SolverOf returns which engine solved a sweep's points.
func SolverOf(st ac.Stats) *Solver {
	j := &Solver{Engine: string(st.Engine), ReducedPoints: st.Reduced, LUPoints: st.LU, Refused: []string{}, Elements: st.Elements}
	for _, e := range st.Refused {
		j.Refused = append(j.Refused, string(e))
	}
	return j
}
