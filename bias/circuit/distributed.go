package circuit

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"
	"gonum.org/v1/gonum/mat"

	"qpoint/ac/touchstone"
	"qpoint/bias/line"
)

// The types of the distributed parts: parts known by their behaviour in
// frequency rather than by a value (bias/line holds their laws).
const (
	TypeTransmissionLine = "transmission_line"
	TypeMicrostrip       = "microstrip"
	TypeSParameterBlock  = "s_parameter_block"
)

var distributedTypes = []string{TypeTransmissionLine, TypeMicrostrip, TypeSParameterBlock}

// Distributed is a transmission line, a microstrip line or a measured
// S-parameter block. It has one port per terminal: port k lies between
// Terminals[k] and Returns[k] (gnd unless the file gives `returns`), a
// line's two ports being its ends.
type Distributed struct {
	Type               string // TypeTransmissionLine, TypeMicrostrip or TypeSParameterBlock
	Name               string
	Terminals, Returns []string

	// Line is the law of a line (Ideal or Microstrip), nil for a block.
	Line       line.Law
	Ideal      *line.Ideal
	Microstrip *line.Microstrip
	// Block holds a block's data; File is its file as the circuit file
	// names it and Path as it was opened.
	Block      *line.Table
	File, Path string

	// DC relates the port voltages and currents at DC: a line's
	// conductors (a short between its ends, with their resistance), or a
	// block's declared behaviour.
	DC line.Relation
	// JoinReturnsAtDC is set for a line whose two returns are different
	// nodes: at DC its return conductor joins them as well (at every
	// other frequency the line is a two-port, which carries no current
	// from one return to the other).
	JoinReturnsAtDC bool
	// DCText says what the DC behaviour is, for reports: "short",
	// "resistance", "open" or "through".
	DCText string
	Pos    Pos
}

// Ports returns the part's port count.
func (d *Distributed) Ports() int { return len(d.Terminals) }

// Nodes returns every node the part touches, terminals first.
func (d *Distributed) Nodes() []string {
	return append(append([]string(nil), d.Terminals...), d.Returns...)
}

var (
	lineKeys       = []string{"type", "name", "ends", "returns", "impedance", "delay", "length", "velocity_factor", "electrical_length", "loss", "dc_resistance"}
	microstripKeys = []string{"type", "name", "ends", "returns", "width", "length", "substrate_height", "relative_permittivity", "thickness", "loss_tangent", "conductivity", "open_end_extension"}
	blockKeys      = []string{"type", "name", "file", "terminals", "returns", "dc"}
)

// partTypeNames lists every part type, for messages.
func partTypeNames() []string {
	return append(append(append([]string(nil), kindNames...), distributedTypes...), TransformerType)
}

// distributedState is what the loader keeps about distributed parts
// while it reads the file.
type distributedState struct {
	types    map[string]string // part name -> type
	openEnds []openEnd
}

// openEnd is a microstrip's open_end_extension, resolved once every part
// is known (resolveOpenEnds).
type openEnd struct {
	name   string // the microstrip's
	auto   bool
	length float64
	at     *yaml.Node
}

func (l *loader) dist() *distributedState {
	if l.distributed == nil {
		l.distributed = &distributedState{types: map[string]string{}}
	}
	return l.distributed
}

// distributedPart reads part n when its type is a distributed one, and
// reports whether it was.
func (l *loader) distributedPart(i int, n *yaml.Node) bool {
	if n.Kind != yaml.MappingNode {
		return false
	}
	tn := lookup(n, "type")
	if tn == nil || tn.Kind != yaml.ScalarNode || !contains(distributedTypes, tn.Value) {
		return false
	}
	d := Distributed{Type: tn.Value, Pos: Pos{n.Line, n.Column}}
	label := fmt.Sprintf("%s #%d", d.Type, i+1)
	nn := lookup(n, "name")
	if nn != nil {
		if name, ok := l.text(nn, "the name of "+label, "a name unique among parts, e.g. T1"); ok {
			d.Name = name
			l.partName(nn, name)
			l.dist().types[name] = d.Type
			label = fmt.Sprintf("%s `%s`", d.Type, name)
		}
	}
	keys := map[string][]string{TypeTransmissionLine: lineKeys, TypeMicrostrip: microstripKeys, TypeSParameterBlock: blockKeys}[d.Type]
	f := l.fields(n, label, keys, func(key string) string {
		if key == "between" {
			return fmt.Sprintf(" (a %s connects with `%s`)", d.Type, map[bool]string{true: "terminals", false: "ends"}[d.Type == TypeSParameterBlock])
		}
		return ""
	})
	if nn == nil {
		l.missing(n, "name", keys, "%s has no `name`; accepted: a name unique among parts, e.g. name: T1", label)
	}
	before := len(l.errs)
	var complete bool
	switch d.Type {
	case TypeTransmissionLine:
		complete = l.lineEnds(n, f, &d, label, keys)
		l.idealLine(n, f, &d, label, keys)
	case TypeMicrostrip:
		complete = l.lineEnds(n, f, &d, label, keys)
		l.microstrip(n, f, &d, label, keys)
	case TypeSParameterBlock:
		complete = l.blockTerminals(n, f, &d, label, keys)
		if complete {
			l.block(n, f, &d, label, keys)
		}
	}
	if !complete {
		l.partsComplete = false
		return true
	}
	if len(l.errs) == before {
		l.c.Distributed = append(l.c.Distributed, d)
	}
	return true
}

// nodeList reads a list of count node names (any count when count is 0).
func (l *loader) nodeList(e *yaml.Node, what, accepted string, count int) ([]string, bool) {
	items, ok := l.sequence(e, what, accepted)
	if !ok {
		return nil, false
	}
	if count > 0 && len(items) != count || count == 0 && len(items) == 0 {
		l.errorf(e, "%s lists %d nodes; accepted: %s", what, len(items), accepted)
		return nil, false
	}
	names := make([]string, len(items))
	for j, it := range items {
		name, good := l.text(it, fmt.Sprintf("a node of %s", what), "a node name, such as gnd or out")
		if !good {
			ok = false
			continue
		}
		names[j] = name
		l.sawNode(it, name)
	}
	return names, ok
}

// lineEnds reads a line's `ends` and `returns`.
func (l *loader) lineEnds(n *yaml.Node, f map[string]entry, d *Distributed, label string, keys []string) bool {
	const accepted = "ends: [NODE, NODE], the line's two ends"
	e, ok := f["ends"]
	if !ok {
		l.missing(n, "ends", keys, "%s has no `ends`; accepted: %s", label, accepted)
		return false
	}
	ends, ok := l.nodeList(e.val, "`ends` of "+label, accepted, 2)
	if !ok {
		return false
	}
	if ends[0] == ends[1] {
		l.errorf(e.val.Content[1], "both ends of %s are on node `%s`; accepted: two different nodes", label, ends[0])
	}
	d.Terminals, d.Returns = ends, []string{Ground, Ground}
	if r, has := f["returns"]; has {
		rets, good := l.nodeList(r.val, "`returns` of "+label, "returns: [NODE, NODE], the return conductor at each end (gnd when not given)", 2)
		if !good {
			return false
		}
		d.Returns = rets
	} else {
		l.touchesGround = true
	}
	return true
}

// idealLine reads a transmission_line's impedance, length and loss.
func (l *loader) idealLine(n *yaml.Node, f map[string]entry, d *Distributed, label string, keys []string) {
	const forms = "delay: 120ps, length: 12mm with velocity_factor: 0.7, or electrical_length: 90deg@5.8GHz"
	li := &line.Ideal{}
	good := true
	if e, ok := f["impedance"]; ok {
		if v, ok := l.value(e.val, Resistance, "impedance of "+label, positive); ok {
			li.Impedance = v
		} else {
			good = false
		}
	} else {
		l.missing(n, "impedance", keys, "%s has no `impedance`; accepted: impedance: the characteristic impedance in ohms, e.g. 50", label)
		good = false
	}
	var given []string
	for _, k := range []string{"delay", "length", "electrical_length"} {
		if _, ok := f[k]; ok {
			given = append(given, k)
		}
	}
	switch len(given) {
	case 0:
		l.errorf(n, "%s has no length; accepted: %s", label, forms)
		good = false
	case 1:
	default:
		l.errorf(f[given[1]].key, "%s gives both `%s` and `%s`; accepted: one of %s", label, given[0], given[1], forms)
		good = false
	}
	vf, hasVF := f["velocity_factor"]
	if e, ok := f["delay"]; ok {
		if v, ok := l.value(e.val, Time, "delay of "+label, positive); ok {
			li.Delay = v
		} else {
			good = false
		}
	}
	if e, ok := f["length"]; ok {
		v, okLen := l.value(e.val, Length, "length of "+label, positive)
		if !hasVF {
			if len(given) == 1 {
				l.errorf(e.key, "%s gives a `length` without `velocity_factor`; accepted: velocity_factor: the wave's speed over c, e.g. 0.66 (1 for a line in air)", label)
			}
			good = false
		} else if factor, ok := l.ratio(vf.val, "velocity_factor of "+label); ok && okLen {
			li.Length = v
			li.Delay = v / (factor * line.SpeedOfLight)
		} else {
			good = false
		}
	} else if hasVF {
		l.errorf(vf.key, "%s gives `velocity_factor` without `length`; accepted: velocity_factor with length, or %s", label, forms)
		good = false
	}
	if e, ok := f["electrical_length"]; ok {
		if deg, hz, ok := l.electricalLength(e.val, "electrical_length of "+label); ok {
			li.Delay = deg / 360 / hz
		} else {
			good = false
		}
	}
	if e, ok := f["loss"]; ok {
		if li.Length == 0 && len(given) == 1 && given[0] != "length" {
			l.errorf(e.key, "%s gives a loss per metre but no physical length (it is given by its %s); accepted: length: with velocity_factor, so that the loss per metre has a length to act on", label, strings.ReplaceAll(given[0], "_", " "))
			good = false
		} else if !l.loss(e.val, li, "loss of "+label) {
			good = false
		}
	}
	if e, ok := f["dc_resistance"]; ok {
		if v, ok := l.value(e.val, Resistance, "dc_resistance of "+label, nonNegative); ok {
			li.DCResistance = v
		} else {
			good = false
		}
	}
	if !good {
		return
	}
	d.Ideal, d.Line = li, li
	d.DC = line.SeriesRelation(li.DCResistance)
	d.DCText = "short"
	if li.DCResistance > 0 {
		d.DCText = "resistance"
	}
	d.JoinReturnsAtDC = d.Returns != nil && d.Returns[0] != d.Returns[1]
}

// ratio reads a ratio from 0 to 1: a number or a percentage.
func (l *loader) ratio(n *yaml.Node, what string) (float64, bool) {
	const accepted = "a ratio above 0 and at most 1, e.g. 0.66 or 66%"
	s, ok := l.text(n, what, accepted)
	if !ok {
		return 0, false
	}
	scale := 1.0
	if num, pct := strings.CutSuffix(s, "%"); pct {
		s, scale = num, 0.01
	}
	v, err := ParseValue(s, Dimensionless)
	v *= scale
	if err != nil || !(v > 0 && v <= 1) {
		l.errorf(n, "%s is `%s`; accepted: %s", what, n.Value, accepted)
		return 0, false
	}
	return v, true
}

// electricalLength reads DEGREESdeg@FREQUENCY.
func (l *loader) electricalLength(n *yaml.Node, what string) (deg, hz float64, ok bool) {
	const accepted = "an angle in degrees at the frequency where it holds, e.g. 90deg@5.8GHz"
	s, good := l.text(n, what, accepted)
	if !good {
		return 0, 0, false
	}
	angle, freq, found := strings.Cut(s, "@")
	if !found {
		l.errorf(n, "%s is `%s`, without the frequency where it holds; accepted: %s", what, s, accepted)
		return 0, 0, false
	}
	num, isDeg := strings.CutSuffix(angle, "deg")
	if !isDeg {
		num, isDeg = strings.CutSuffix(angle, "°")
	}
	d, err := strconv.ParseFloat(num, 64)
	if !isDeg || err != nil || strings.ContainsAny(num, "xXpP_nN") || !(d > 0) || d > 1e6 {
		l.errorf(n, "%s is `%s`: `%s` is not an angle above 0 in degrees; accepted: %s", what, s, angle, accepted)
		return 0, 0, false
	}
	hz, err = ParseBounded(freq, Frequency)
	if err != nil {
		l.errorf(n, "%s is `%s`: %v; accepted: %s", what, s, err, accepted)
		return 0, 0, false
	}
	return d, hz, true
}

// loss reads a line's loss: `0.2dB/m@1GHz` (the conductors', growing as
// √f) or {conductor: ..., dielectric: ...} (the dielectric's growing as f).
func (l *loader) loss(n *yaml.Node, li *line.Ideal, what string) bool {
	const accepted = "a loss in dB per metre at a frequency, e.g. 0.2dB/m@1GHz (the conductors', growing as √f), or {conductor: 0.15dB/m@1GHz, dielectric: 0.05dB/m@1GHz}"
	one := func(n *yaml.Node, what string) (npm, hz float64, ok bool) {
		s, good := l.text(n, what, accepted)
		if !good {
			return 0, 0, false
		}
		val, freq, found := strings.Cut(s, "@")
		num, perMetre := strings.CutSuffix(val, "dB/m")
		v, err := strconv.ParseFloat(num, 64)
		if !found || !perMetre || err != nil || strings.ContainsAny(num, "xXpP_nN") || !(v >= 0) || v > 1e6 {
			l.errorf(n, "%s is `%s`; accepted: %s", what, s, accepted)
			return 0, 0, false
		}
		hz, err = ParseBounded(freq, Frequency)
		if err != nil {
			l.errorf(n, "%s is `%s`: %v; accepted: %s", what, s, err, accepted)
			return 0, 0, false
		}
		return v * line.NepersPerDB, hz, true
	}
	if n.Kind == yaml.ScalarNode {
		v, hz, ok := one(n, what)
		li.ConductorLoss, li.LossHz = v, hz
		return ok
	}
	f := l.fields(n, what, []string{"conductor", "dielectric"}, nil)
	if n.Kind != yaml.MappingNode {
		return false
	}
	ok := len(f) > 0
	if !ok {
		l.errorf(n, "%s is an empty mapping; accepted: %s", what, accepted)
	}
	var ac, fc, ad, fd float64
	if e, has := f["conductor"]; has {
		var good bool
		if ac, fc, good = one(e.val, "conductor "+what); !good {
			ok = false
		}
	}
	if e, has := f["dielectric"]; has {
		var good bool
		if ad, fd, good = one(e.val, "dielectric "+what); !good {
			ok = false
		}
	}
	// One reference frequency: the dielectric's α grows as f.
	li.LossHz = fc
	if fc == 0 {
		li.LossHz = fd
	}
	li.ConductorLoss = ac
	if fd > 0 {
		li.DielectricLoss = ad * li.LossHz / fd
	}
	return ok
}

// microstrip reads a microstrip's geometry and materials.
func (l *loader) microstrip(n *yaml.Node, f map[string]entry, d *Distributed, label string, keys []string) {
	m := &line.Microstrip{Conductivity: line.Copper}
	good := true
	length := func(key string, dst *float64, required bool) {
		e, ok := f[key]
		if !ok {
			if required {
				l.missing(n, key, keys, "%s has no `%s`; accepted: %s: a length, e.g. %s", label, key, key,
					map[string]string{"width": "1.1mm", "length": "8mm", "substrate_height": "0.508mm", "thickness": "35um"}[key])
				good = false
			}
			return
		}
		if v, ok := l.value(e.val, Length, key+" of "+label, positive); ok {
			*dst = v
		} else {
			good = false
		}
	}
	length("width", &m.Width, true)
	length("length", &m.Length, true)
	length("substrate_height", &m.Height, true)
	length("thickness", &m.Thickness, true)
	atLeastOne := rule{func(v float64) bool { return v >= 1 }, "below 1", "a relative permittivity of at least 1"}
	if e, ok := f["relative_permittivity"]; ok {
		if v, ok := l.value(e.val, Dimensionless, "relative_permittivity of "+label, atLeastOne); ok {
			m.Permittivity = v
		} else {
			good = false
		}
	} else {
		l.missing(n, "relative_permittivity", keys, "%s has no `relative_permittivity`; accepted: relative_permittivity: the substrate's εr, e.g. 3.55", label)
		good = false
	}
	belowOne := rule{func(v float64) bool { return v >= 0 && v < 1 }, "outside 0 to 1", "a loss tangent from 0 up to (not including) 1, e.g. 0.0027"}
	if e, ok := f["loss_tangent"]; ok {
		if v, ok := l.value(e.val, Dimensionless, "loss_tangent of "+label, belowOne); ok {
			m.LossTangent = v
		} else {
			good = false
		}
	}
	if e, ok := f["conductivity"]; ok {
		const accepted = "the strip's conductivity in S/m, e.g. 5.8e7S/m or 58MS/m (copper, the default)"
		s, ok := l.text(e.val, "conductivity of "+label, accepted)
		if ok {
			v, err := ParseValue(strings.TrimSuffix(s, "S/m"), Dimensionless)
			if err != nil || !(v > 0) || v > 1e12 {
				l.errorf(e.val, "conductivity of %s is `%s`; accepted: %s", label, s, accepted)
				good = false
			} else {
				m.Conductivity = v
			}
		} else {
			good = false
		}
	}
	if e, ok := f["open_end_extension"]; ok {
		req := openEnd{name: d.Name, at: e.val}
		if e.val.Kind == yaml.ScalarNode && e.val.Value == "auto" {
			req.auto = true
		} else if v, ok := l.quantity(e.val, Length, "open_end_extension of "+label); ok && v >= 0 {
			req.length = v
		} else {
			if ok {
				l.errorf(e.val, "open_end_extension of %s is negative; accepted: auto (Hammerstad's estimate) or a length, e.g. 0.2mm", label)
			}
			good = false
		}
		if good {
			l.dist().openEnds = append(l.dist().openEnds, req)
		}
	}
	if !good {
		return
	}
	d.Microstrip, d.Line = m, m
	d.DC = line.SeriesRelation(m.DCResistance())
	d.DCText = "resistance"
	d.JoinReturnsAtDC = d.Returns != nil && d.Returns[0] != d.Returns[1]
	for _, msg := range m.Outside() {
		l.warnAt(d.Pos, OutsideModel, "%s: %s", label, msg)
	}
}

// blockTerminals reads a block's `terminals` and `returns`.
func (l *loader) blockTerminals(n *yaml.Node, f map[string]entry, d *Distributed, label string, keys []string) bool {
	const accepted = "terminals: [NODE, ...], one node per port of the file, in its port order"
	e, ok := f["terminals"]
	if !ok {
		l.missing(n, "terminals", keys, "%s has no `terminals`; accepted: %s", label, accepted)
		return false
	}
	terms, ok := l.nodeList(e.val, "`terminals` of "+label, accepted, 0)
	if !ok {
		return false
	}
	d.Terminals = terms
	d.Returns = make([]string, len(terms))
	for k := range d.Returns {
		d.Returns[k] = Ground
	}
	if r, has := f["returns"]; has {
		rets, good := l.nodeList(r.val, "`returns` of "+label, fmt.Sprintf("returns: [NODE, ...], one per terminal (%d), each port's return (gnd when not given)", len(terms)), len(terms))
		if !good {
			return false
		}
		d.Returns = rets
	} else {
		l.touchesGround = true
	}
	for k, t := range terms {
		for j := 0; j < k; j++ {
			if terms[j] == t && d.Returns[j] == d.Returns[k] {
				l.errorf(e.val.Content[k], "ports %d and %d of %s both lie between `%s` and `%s`; accepted: each port on its own pair of nodes", j+1, k+1, label, t, d.Returns[k])
			}
		}
	}
	return true
}

// maxBlockFile bounds the size of a block's Touchstone file.
const maxBlockFile = 64 << 20

// block reads a block's file and its DC behaviour.
func (l *loader) block(n *yaml.Node, f map[string]entry, d *Distributed, label string, keys []string) {
	ports := d.Ports()
	e, ok := f["file"]
	if !ok {
		l.missing(n, "file", keys, "%s has no `file`; accepted: file: a Touchstone file of %d ports, e.g. filter%s, relative to the circuit file", label, ports, touchstone.Ext(ports))
	} else if name, good := l.text(e.val, "file of "+label, "a Touchstone file name"); good {
		d.File = name
		d.Path = name
		if !filepath.IsAbs(name) {
			d.Path = filepath.Join(filepath.Dir(l.file), name)
		}
		l.blockData(e.val, d, label)
	}
	dcNode, ok := f["dc"]
	if !ok {
		l.missing(n, "dc", keys, "%s has no `dc`: what the block does at DC is not in its file; accepted: dc: open, dc: {through: [[TERMINAL, TERMINAL]]} (terminals joined at DC) or dc: {resistance: [[R11, ...], ...]} (a %d×%d matrix)", label, ports, ports)
		return
	}
	l.blockDC(dcNode.val, d, label)
	if d.Block != nil && d.DC.Ports == ports {
		s, err := d.DC.Scattering(d.Block.References)
		if err != nil {
			l.errorf(dcNode.val, "dc of %s has no S-matrix against the file's reference impedances; accepted: a passive DC behaviour", label)
			return
		}
		if d.Block.Freqs[0] > 0 {
			d.Block.DC = make([]complex128, len(s))
			for i, v := range s {
				d.Block.DC[i] = complex(v, 0)
			}
		}
	}
}

// blockData reads the Touchstone file of a block; n is the `file` value.
func (l *loader) blockData(n *yaml.Node, d *Distributed, label string) {
	ports := d.Ports()
	accepted := fmt.Sprintf("a Touchstone 1.1 or 2.0 file of S-parameters with %d ports (one per terminal)", ports)
	fail := func(format string, args ...any) {
		l.errorf(n, "%s: `%s` %s; accepted: %s", label, d.File, fmt.Sprintf(format, args...), accepted)
	}
	// Look before opening: a named pipe would hold the load until
	// someone wrote to it.
	st, err := os.Stat(d.Path)
	switch {
	case err != nil:
		fail("cannot be read: %v", unwrapPath(err))
		return
	case st.IsDir():
		fail("is a folder")
		return
	case !st.Mode().IsRegular():
		fail("is not a regular file")
		return
	case st.Size() > maxBlockFile:
		fail("is %d bytes, more than the %d MiB a block's file may have", st.Size(), maxBlockFile>>20)
		return
	}
	file, err := os.Open(d.Path)
	if err != nil {
		fail("cannot be read: %v", unwrapPath(err))
		return
	}
	defer file.Close()
	// A version 1.1 file states its port count in its extension alone;
	// a file without one must be version 2.0, whose [Number of Ports] is
	// then held to the terminals.
	want := ports
	if k, err := touchstone.PortCount(d.File); err == nil {
		want = k
		if k != ports {
			fail("is a %d-port by its extension %s, but %s lists %d terminals", k, touchstone.Ext(k), label, ports)
			return
		}
	}
	tsPorts, points, err := touchstone.Read(io.LimitReader(file, maxBlockFile), want)
	if err != nil {
		var le *touchstone.LineError
		if errors.As(err, &le) {
			fail("line %d: %v", le.Line, le.Err)
		} else {
			fail("is not a Touchstone file: %v", err)
		}
		return
	}
	if len(tsPorts) != ports {
		fail("has %d ports, but %s lists %d terminals", len(tsPorts), label, ports)
		return
	}
	t := &line.Table{Ports: ports}
	for _, p := range tsPorts {
		t.References = append(t.References, p.Impedance)
	}
	for _, p := range points {
		s := make([]complex128, 0, ports*ports)
		for _, row := range p.S {
			s = append(s, row...)
		}
		t.Freqs = append(t.Freqs, p.FrequencyHz)
		t.S = append(t.S, s)
	}
	if err := t.Check(); err != nil {
		fail("%v", err)
		return
	}
	d.Block = t
	if g, at := t.Passivity(); g > 1+1e-9 {
		l.warnAt(Pos{n.Line, n.Column}, NotPassive, "%s: the data in `%s` are not passive: the largest singular value of S is %.6g at %s Hz (above 1, the block gives out more power than it takes); noise by Twiss's theorem assumes a passive block",
			label, d.File, g, strconv.FormatFloat(at, 'g', 6, 64))
	}
	if lo, hi, turn, sparse := t.Sparse(); sparse {
		l.warnAt(Pos{n.Line, n.Column}, SparseData, "%s: between %s Hz and %s Hz a phase in `%s` turns by %.0f°; interpolation, linear in real and imaginary parts, cuts the corner of such a turn (give the data at least every 17°)",
			label, strconv.FormatFloat(lo, 'g', 6, 64), strconv.FormatFloat(hi, 'g', 6, 64), d.File, turn)
	}
}

// unwrapPath drops the path an os error repeats, which the message has.
func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// blockDC reads a block's `dc`.
func (l *loader) blockDC(n *yaml.Node, d *Distributed, label string) {
	ports := d.Ports()
	accepted := fmt.Sprintf("open, {through: [[TERMINAL, TERMINAL], ...]} (terminals joined at DC, the others open) or {resistance: [[R11, ...], ...]} (a %d×%d matrix of resistances, V = R I)", ports, ports)
	what := "dc of " + label
	if n.Kind == yaml.ScalarNode {
		if n.Value == "open" {
			d.DC, d.DCText = line.Open(ports), "open"
			return
		}
		l.errorf(n, "%s is `%s`; accepted: %s", what, n.Value, accepted)
		return
	}
	if n.Kind != yaml.MappingNode || len(n.Content) != 2 {
		l.errorf(n, "%s is %s; accepted: %s", what, kindName(n), accepted)
		return
	}
	f := l.fields(n, what, []string{"through", "resistance"}, nil)
	if e, ok := f["through"]; ok {
		groups, ok := l.sequence(e.val, "through of "+label, accepted)
		if !ok {
			return
		}
		used := map[string]bool{}
		var idx [][]int
		for _, g := range groups {
			names, ok := l.sequence(g, "a group of through of "+label, "a list of two or more terminals, e.g. [in, out]")
			if !ok {
				return
			}
			if len(names) < 2 {
				l.errorf(g, "a group of through of %s lists %d terminal; accepted: two or more terminals joined at DC, e.g. [in, out]", label, len(names))
				return
			}
			var group []int
			for _, nn := range names {
				name, ok := l.text(nn, "a terminal of through of "+label, "a terminal of the block")
				if !ok {
					return
				}
				k := indexOf(d.Terminals, name)
				if k < 0 {
					l.errorf(nn, "`%s` in through of %s is not one of its terminals; accepted: %s", name, label, nameList(d.Terminals, 12))
					return
				}
				if used[name] {
					l.errorf(nn, "terminal `%s` appears twice in through of %s; accepted: each terminal in one group at most", name, label)
					return
				}
				used[name] = true
				group = append(group, k)
			}
			idx = append(idx, group)
		}
		d.DC, d.DCText = line.Through(ports, idx), "through"
		return
	}
	if e, ok := f["resistance"]; ok {
		rows, ok := l.sequence(e.val, "resistance of "+label, accepted)
		if !ok {
			return
		}
		if len(rows) != ports {
			l.errorf(e.val, "resistance of %s has %d rows; accepted: %d rows of %d resistances, one per terminal", label, len(rows), ports, ports)
			return
		}
		r := make([]float64, ports*ports)
		for i, row := range rows {
			cells, ok := l.sequence(row, fmt.Sprintf("row %d of resistance of %s", i+1, label), fmt.Sprintf("a list of %d resistances", ports))
			if !ok {
				return
			}
			if len(cells) != ports {
				l.errorf(row, "row %d of resistance of %s has %d entries; accepted: %d resistances", i+1, label, len(cells), ports)
				return
			}
			for j, c := range cells {
				v, ok := l.quantity(c, Resistance, fmt.Sprintf("resistance R%d%d of %s", i+1, j+1, label))
				if !ok {
					return
				}
				r[i*ports+j] = v
			}
		}
		if !passiveResistance(r, ports) {
			l.errorf(e.val, "resistance of %s is not passive: R + Rᵀ has a negative eigenvalue, so the block would give out power at DC; accepted: a resistance matrix whose symmetric part is positive semidefinite", label)
			return
		}
		d.DC, d.DCText = line.Resistance(ports, r), "resistance"
	}
}

// passiveResistance reports whether the symmetric part of the resistance
// matrix r is positive semidefinite (gonum's symmetric eigensolver), to
// the rounding of its largest entry.
func passiveResistance(r []float64, p int) bool {
	s := mat.NewSymDense(p, nil)
	big := 0.0
	for i := 0; i < p; i++ {
		for j := i; j < p; j++ {
			v := (r[i*p+j] + r[j*p+i]) / 2
			s.SetSym(i, j, v)
			big = math.Max(big, math.Abs(v))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(s, false) {
		return false
	}
	for _, v := range eig.Values(nil) {
		if v < -1e-12*big {
			return false
		}
	}
	return true
}

func indexOf(list []string, s string) int {
	for i, x := range list {
		if x == s {
			return i
		}
	}
	return -1
}

// resolveOpenEnds sets each microstrip's open-end extension, now that
// every part is known: an end is open when nothing else touches its node.
func (l *loader) resolveOpenEnds() {
	if l.distributed == nil || len(l.distributed.openEnds) == 0 {
		return
	}
	count := map[string]int{}
	for _, p := range l.c.Parts {
		count[p.Nodes[0]]++
		count[p.Nodes[1]]++
	}
	for _, p := range l.c.Ports {
		count[p.Node]++
	}
	for _, d := range l.c.Distributed {
		for _, n := range d.Nodes() {
			count[n]++
		}
	}
	for _, req := range l.distributed.openEnds {
		k := slices.IndexFunc(l.c.Distributed, func(d Distributed) bool { return d.Name == req.name })
		if k < 0 || l.c.Distributed[k].Microstrip == nil {
			continue // not read whole: its error says why
		}
		d := &l.c.Distributed[k]
		open := 0
		for k, end := range d.Terminals {
			if end != Ground && end != d.Returns[k] && count[end] == 1 {
				open++
			}
		}
		if open == 0 {
			l.errorf(req.at, "open_end_extension of microstrip `%s`: neither end (%s, %s) is open, nothing else is on it; accepted: open_end_extension on a strip with an open end (a stub)", d.Name, d.Terminals[0], d.Terminals[1])
			continue
		}
		per := req.length
		if req.auto {
			per = d.Microstrip.OpenEndExtension()
		}
		d.Microstrip.Extension = float64(open) * per
	}
}

// distributedName returns the type of the distributed part called name,
// "" when there is none.
func (l *loader) distributedName(name string) string {
	if l.distributed == nil {
		return ""
	}
	return l.distributed.types[name]
}

// dcPaths returns the pairs of nodes the distributed parts join at DC,
// for the check that every node has a DC path to gnd: a line's ends and
// returns; a block's joined terminals, and under a resistance matrix each
// port's terminal and return and the terminals it couples.
func (l *loader) dcPaths() [][2]string {
	var out [][2]string
	for _, d := range l.c.Distributed {
		switch d.DCText {
		case "short", "resistance":
			if d.Line != nil {
				out = append(out, [2]string{d.Terminals[0], d.Terminals[1]}, [2]string{d.Returns[0], d.Returns[1]})
				continue
			}
			p := d.Ports()
			for i := 0; i < p; i++ {
				out = append(out, [2]string{d.Terminals[i], d.Returns[i]})
				for j := 0; j < p; j++ {
					if d.DC.N[i*p+j] != 0 && i != j {
						out = append(out, [2]string{d.Terminals[i], d.Terminals[j]})
					}
				}
			}
		case "through":
			p := d.Ports()
			for i := 0; i < p; i++ {
				for j := 0; j < p; j++ {
					if d.DC.M[i*p+j] != 0 && i != j {
						out = append(out, [2]string{d.Terminals[i], d.Terminals[j]}, [2]string{d.Returns[i], d.Returns[j]})
					}
				}
			}
		}
	}
	return out
}

// dcShort is a pair of nodes a distributed part shorts at DC.
type dcShort struct {
	a, b string
	name string
	pos  Pos
}

// dcShorts returns the shorts the distributed parts make at DC, for the
// check for loops of shorts: a line without conductor resistance between
// its ends, a line's return conductor between different returns, the
// terminals a block joins (where their returns are one node), and a
// block port whose resistance row is zero (a short to its return).
func (l *loader) dcShorts() []dcShort {
	var out []dcShort
	for _, d := range l.c.Distributed {
		add := func(a, b string) { out = append(out, dcShort{a, b, d.Name, d.Pos}) }
		p := d.Ports()
		switch {
		case d.Line != nil:
			if d.DCText == "short" {
				add(d.Terminals[0], d.Terminals[1])
			}
			if d.JoinReturnsAtDC {
				add(d.Returns[0], d.Returns[1])
			}
		case d.DCText == "through":
			for i := 0; i < p; i++ {
				for j := 0; j < p; j++ {
					if d.DC.M[i*p+j] != 0 && i != j && d.Returns[i] == d.Returns[j] {
						add(d.Terminals[i], d.Terminals[j])
					}
				}
			}
		case d.DCText == "resistance":
			for i := 0; i < p; i++ {
				zero := true
				for j := 0; j < p; j++ {
					zero = zero && d.DC.N[i*p+j] == 0
				}
				if zero {
					add(d.Terminals[i], d.Returns[i])
				}
			}
		}
	}
	return out
}

// floatingAboveDC reports groups of nodes that reach gnd at DC only
// through a line's return conductor. Above DC a line is a two-port whose
// ports carry balanced currents: its return conductor joins its two
// returns at DC alone, and a node held only by it has no potential at
// any other frequency (the network matrix would be singular there).
func (l *loader) floatingAboveDC(index map[string]int) {
	joins := false
	for _, d := range l.c.Distributed {
		joins = joins || d.JoinReturnsAtDC
	}
	if !joins {
		return
	}
	uf := newUnionFind(len(index))
	for _, p := range l.c.Parts {
		if p.Kind != CurrentSource {
			uf.union(index[p.Nodes[0]], index[p.Nodes[1]])
		}
	}
	for _, p := range l.c.Ports {
		uf.union(index[p.Node], index[p.Return])
	}
	for _, d := range l.c.Distributed {
		for k := range d.Terminals {
			uf.union(index[d.Terminals[k]], index[d.Returns[k]])
		}
	}
	ground := uf.find(0)
	reported := map[int]bool{}
	for _, d := range l.c.Distributed {
		if !d.JoinReturnsAtDC {
			continue
		}
		for _, r := range d.Returns {
			root := uf.find(index[r])
			if root == ground || reported[root] {
				continue
			}
			reported[root] = true
			l.errorAt(d.Pos.Line, d.Pos.Col,
				"return `%s` of %s `%s` reaches gnd only through the line's return conductor, which joins its two returns at DC alone: above DC each end of a line is a port with balanced currents, so `%s` would float; accepted: a path from `%s` to gnd or to the other return through some part (or the same node for both returns)",
				r, d.Type, d.Name, r, r)
		}
	}
}
