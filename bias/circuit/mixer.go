package circuit

import (
	"math"

	"go.yaml.in/yaml/v3"
)

// MixerDefaults holds the file's defaults for a mixer analysis
// (analysis.mixer): the ports the LO drives, the RF enters and the IF
// leaves, the two frequencies and the LO level.
type MixerDefaults struct {
	Set           bool
	LO, RF, IF    string // port names
	LOFrequencyHz float64
	RFFrequencyHz float64
	LOLevel       Level
	Pos           Pos
	// KeyPos holds where each key's value is written, for messages
	// about a value the file gave.
	KeyPos map[string]Pos
}

var mixerKeys = []string{"lo", "lo_frequency", "lo_level", "rf", "rf_frequency", "if"}

const mixerExample = "e.g. {lo: lo, lo_frequency: 2.4GHz, lo_level: 7dBm, rf: rf, rf_frequency: 2.45GHz, if: if}"

// mixer reads {lo, lo_frequency, lo_level, rf, rf_frequency, if}, every
// key needed.
func (l *loader) mixer(n *yaml.Node) {
	d := &l.c.Analysis.Mixer
	d.Pos = Pos{n.Line, n.Column}
	d.KeyPos = map[string]Pos{}
	const what = "the mixer analysis"
	f := l.fields(n, what, mixerKeys, nil)
	if n.Kind != yaml.MappingNode {
		return
	}
	ok := true
	for _, key := range mixerKeys {
		if e, has := f[key]; has {
			d.KeyPos[key] = Pos{e.val.Line, e.val.Column}
		} else {
			l.missing(n, key, mixerKeys, "%s has no `%s`; accepted: %s", what, key, mixerExample)
			ok = false
		}
	}
	ports := map[string]*yaml.Node{}
	for _, key := range []string{"lo", "rf", "if"} {
		e, has := f[key]
		if !has {
			continue
		}
		name, good := l.text(e.val, "`"+key+"` of "+what, "a port name")
		if !good {
			ok = false
			continue
		}
		switch key {
		case "lo":
			d.LO = name
		case "rf":
			d.RF = name
		case "if":
			d.IF = name
		}
		if _, isPort := l.portAt[name]; !isPort {
			l.errorf(e.val, "`%s` of %s is `%s`, which is not a port%s; accepted: a port name: %s",
				key, what, name, didYouMean(name, l.portNames()), nameList(l.portNames(), 12))
			ok = false
			continue
		}
		if other, taken := ports[name]; taken {
			l.errorf(e.val, "`%s` of %s is port `%s`, which `%s` names already; accepted: three different ports for the LO, the RF and the IF",
				key, what, name, other.Value)
			ok = false
			continue
		}
		ports[name] = e.key
	}
	if e, has := f["lo_frequency"]; has {
		v, good := l.value(e.val, Frequency, "`lo_frequency` of "+what, positive)
		d.LOFrequencyHz, ok = v, ok && good
	}
	if e, has := f["rf_frequency"]; has {
		v, good := l.value(e.val, Frequency, "`rf_frequency` of "+what, positive)
		d.RFFrequencyHz, ok = v, ok && good
		if good && d.LOFrequencyHz > 0 && math.Abs(v-d.LOFrequencyHz) <= 1e-9*math.Max(v, d.LOFrequencyHz) {
			l.errorf(e.val, "`rf_frequency` of %s equals its `lo_frequency`: the IF would be 0 Hz; accepted: an RF away from the LO by the IF, e.g. 2.45GHz with the LO at 2.4GHz", what)
			ok = false
		}
	}
	if e, has := f["lo_level"]; has {
		if s, good := l.scalarText(e.val, "`lo_level` of "+what, levelAccepted); good {
			lv, err := ParseLevel(s)
			if err != nil {
				l.wrapf(e.val, err, "`lo_level` of %s", what)
				ok = false
			} else {
				d.LOLevel = lv
			}
		} else {
			ok = false
		}
	}
	d.Set = ok
}
