package plan

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"qpoint/ac"
	"qpoint/bias/circuit"
)

// Defaults of the policy, used where neither the request nor the file
// says otherwise.
const (
	// DefaultFromHz, DefaultToHz and DefaultPerDecade are the response
	// sweep: 1 MHz to 10 GHz at 20 points a decade.
	DefaultFromHz    = 1e6
	DefaultToHz      = 10e9
	DefaultPerDecade = 20
	// DefaultLevelDBm is the drive of a distortion analysis.
	DefaultLevelDBm = -30
	// DefaultVideoFromHz and DefaultVideoToHz are the video band a
	// detector's tangential sensitivity is quoted in (1 Hz to 2 MHz).
	DefaultVideoFromHz = 1
	DefaultVideoToHz   = 2e6
	// DefaultStudySteps is the step count of a study that names none.
	DefaultStudySteps = 21
)

// RequestError is a problem with what was asked: a setting the front end
// passed, or the file's default for it. Settings names the settings at
// fault, as the plan calls them ("input", "frequency", "from", ...); a
// front end names its own inputs after them (the command line's flags
// carry the same names). When the value came from the circuit file, File
// and Pos say where, and Key names it there (analysis.distortion.level).
type RequestError struct {
	Settings []string
	File     string
	Pos      circuit.Pos
	Key      string
	Err      error
}

func (e *RequestError) Error() string {
	if len(e.Settings) == 0 {
		return e.Err.Error()
	}
	if e.File != "" {
		return fmt.Sprintf("%s:%d:%d: %s: %v", e.File, e.Pos.Line, e.Pos.Col, e.Key, e.Err)
	}
	return strings.Join(e.Settings, ", ") + ": " + e.Err.Error()
}

// FromFile reports whether the value at fault came from the circuit file.
func (e *RequestError) FromFile() bool { return e.File != "" }

// fileErr makes a RequestError for a value of the file's analysis.section
// block at pos.
func fileErr(c *circuit.Circuit, setting, section string, pos circuit.Pos, format string, args ...any) error {
	return &RequestError{Settings: []string{setting}, File: c.File, Pos: pos,
		Key: "analysis." + section + "." + strings.ReplaceAll(setting, "-", "_"), Err: fmt.Errorf(format, args...)}
}

// originErr makes a RequestError for setting, placed in the file when the
// request did not give the value.
func originErr(c *circuit.Circuit, given bool, setting, section string, pos circuit.Pos, format string, args ...any) error {
	if given {
		return requestErr(setting, format, args...)
	}
	return fileErr(c, setting, section, pos, format, args...)
}

func (e *RequestError) Unwrap() error { return e.Err }

// requestErr makes a RequestError for setting from a format.
func requestErr(setting string, format string, args ...any) error {
	return &RequestError{Settings: strings.Split(setting, ","), Err: fmt.Errorf(format, args...)}
}

// IsRequest reports whether err is (or wraps) a RequestError.
func IsRequest(err error) bool {
	var r *RequestError
	return errors.As(err, &r)
}

// Path is where a signal enters and where it is observed.
type Path struct {
	Input      int // input port index; -1 for a circuit without ports
	InputName  string
	Output     ac.Output
	OutputName string
}

// SignalPath picks the input port and the output port or node: the
// names given, else the file's analysis.distortion, else the first and
// last ports. A circuit without ports has no input, and its output must
// be named as a node.
func SignalPath(c *circuit.Circuit, input, output string) (Path, error) {
	def := c.Analysis.Distortion
	var names []string
	for _, p := range c.Ports {
		names = append(names, p.Name)
	}
	p := Path{Input: -1, InputName: input, OutputName: output}
	if p.InputName == "" && def.Set {
		p.InputName = def.Input
	}
	if p.InputName == "" && len(c.Ports) > 0 {
		p.InputName = c.Ports[0].Name
	}
	if p.InputName != "" {
		if p.Input = portIndex(c, p.InputName); p.Input < 0 {
			return p, requestErr("input", "`%s` is not a port; accepted: %s", p.InputName, strings.Join(names, ", "))
		}
	}
	if p.OutputName == "" && def.Set {
		p.OutputName = def.Output
	}
	if p.OutputName == "" && len(c.Ports) > 0 {
		p.OutputName = c.Ports[len(c.Ports)-1].Name
	}
	if p.OutputName == "" {
		return p, requestErr("output", "%s has no ports: name the node to observe", c.File)
	}
	p.Output = ac.Output{Port: portIndex(c, p.OutputName), Node: p.OutputName}
	if p.Output.Port < 0 {
		found := false
		for _, n := range c.Nodes {
			found = found || n == p.OutputName
		}
		if !found {
			return p, requestErr("output", "`%s` is neither a port nor a node; accepted ports: %s; or a node of the circuit", p.OutputName, strings.Join(names, ", "))
		}
	}
	return p, nil
}

func portIndex(c *circuit.Circuit, name string) int {
	for i, p := range c.Ports {
		if p.Name == name {
			return i
		}
	}
	return -1
}

// Grid asks for a frequency grid. A zero field takes the file's
// analysis.response, else the policy's defaults; PerDecade and Points
// exclude each other.
type Grid struct {
	FromHz, ToHz float64
	PerDecade    int // points per decade on a logarithmic grid
	Points       int // points on a linear grid
}

// ResponseGrid resolves the frequencies of a response sweep.
func ResponseGrid(c *circuit.Circuit, g Grid) ([]float64, error) {
	from, to := DefaultFromHz, DefaultToHz
	perDecade, points := DefaultPerDecade, 0
	if r := c.Analysis.Response; r.Set {
		from, to = r.FromHz, r.ToHz
		perDecade, points = r.PerDecade, r.Points
	}
	if g.FromHz != 0 {
		from = g.FromHz
	}
	if g.ToHz != 0 {
		to = g.ToHz
	}
	if g.PerDecade != 0 && g.Points != 0 {
		return nil, requestErr("per-decade,points", "give one grid, not both")
	}
	if g.PerDecade != 0 {
		perDecade, points = g.PerDecade, 0
	}
	if g.Points != 0 {
		perDecade, points = 0, g.Points
	}
	var grid []float64
	var err error
	if points > 0 {
		grid, err = ac.LinearGrid(from, to, points)
	} else {
		grid, err = ac.LogGrid(from, to, perDecade)
	}
	if err != nil {
		return nil, requestErr("from,to,per-decade,points", "%w; accepted: 1mHz to 1THz, rising, at least one point", err)
	}
	return grid, nil
}

// DesignFrequency is the frequency a circuit is designed for, as figures
// mark it: the file's distortion frequency, or zero when it names none.
func DesignFrequency(c *circuit.Circuit) float64 {
	if d := c.Analysis.Distortion; d.Set {
		return d.FrequencyHz
	}
	return 0
}

// SignalFrequency is the frequency an analysis that needs one takes when
// the request names none: the file's distortion frequency, else the
// geometric middle of its response range, else 1 GHz.
func SignalFrequency(c *circuit.Circuit) float64 {
	switch {
	case c.Analysis.Distortion.Set:
		return c.Analysis.Distortion.FrequencyHz
	case c.Analysis.Response.Set:
		return math.Sqrt(c.Analysis.Response.FromHz * c.Analysis.Response.ToHz)
	}
	return 1e9
}
