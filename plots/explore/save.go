package explore

import (
	"bytes"
	"fmt"
	"slices"
	"strings"

	"qpoint/bias/circuit"
	"qpoint/plots/report"
)

// CircuitFile returns the circuit file with the request's values written
// into it (circuit.Rewrite: the file's own text, comments and layout, with
// the values changed where they stand), headed by a comment that says
// which values changed. The drive's level and frequency go into the
// file's analysis.distortion when they differ from the file's.
func (s *Session) CircuitFile(req Request) ([]byte, error) {
	vals, errs := s.resolve(req)
	if len(errs) > 0 {
		return nil, errorsOf(errs)
	}
	var edits []circuit.Edit
	var said []string
	for _, o := range vals.c.Overrides {
		edits = append(edits, circuit.Edit{Target: o.Target, Text: o.Text})
		said = append(said, o.String())
	}
	if d := vals.drive; d != nil && (d.FrequencyHz != s.drive.FrequencyHz || d.LevelDBm != s.drive.LevelDBm || !s.base.Analysis.Distortion.Set) {
		level, freq := vals.level, vals.freq
		if level == "" {
			level = formatLevel(d.LevelDBm)
		}
		if freq == "" {
			freq = valueText(d.FrequencyHz, 6)
		}
		if !s.base.Analysis.Distortion.Set {
			edits = append(edits, circuit.Edit{Target: "analysis.distortion.input", Text: d.InputName},
				circuit.Edit{Target: "analysis.distortion.output", Text: d.OutputName})
		}
		edits = append(edits, circuit.Edit{Target: "analysis.distortion.frequency", Text: freq},
			circuit.Edit{Target: "analysis.distortion.level", Text: level})
		said = append(said, DriveFrequency+"="+freq, DriveLevel+"="+level)
		if d.SecondToneHz != 0 {
			second := valueText(d.SecondToneHz, 9)
			edits = append(edits, circuit.Edit{Target: "analysis.distortion.second_tone", Text: second})
			said = append(said, "second tone="+second)
		}
	}
	out, err := circuit.Rewrite(s.file, s.src, edits)
	if err != nil {
		return nil, err
	}
	head := "# Written by qpoint explore from " + s.file + "; values changed: "
	if len(said) == 0 {
		head += "none"
	}
	head += strings.Join(said, ", ") + "\n"
	return append([]byte(sanitizeComment(head)), out...), nil
}

// ReportCircuit returns the circuit at the request's values for a report:
// the values set (the report's subtitle names them) and the drive's level
// and frequency as the circuit's distortion defaults, so that every
// analysis of the report runs at the values on the page.
func (s *Session) ReportCircuit(req Request) (*circuit.Circuit, error) {
	vals, errs := s.resolve(req)
	if len(errs) > 0 {
		return nil, errorsOf(errs)
	}
	c := *vals.c
	if d := vals.drive; d != nil {
		def := c.Analysis.Distortion
		def.Set, def.Input, def.Output = true, d.InputName, d.OutputName
		def.OutputIsPort = d.Drive.Output.Port >= 0
		def.FrequencyHz, def.SecondToneHz = d.FrequencyHz, d.SecondToneHz
		def.Level = circuit.Level{DBm: d.LevelDBm, IsPower: true}
		c.Analysis.Distortion = def
	}
	return &c, nil
}

// ReportFile returns the HTML report at the request's values
// (report.Build on ReportCircuit, as `qpoint report` builds it).
func (s *Session) ReportFile(req Request) ([]byte, error) {
	c, err := s.ReportCircuit(req)
	if err != nil {
		return nil, err
	}
	doc, err := report.Build(c, report.Settings{})
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if err := report.Write(&b, doc); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// errorsOf joins a request's problems into one error, in a stable order.
func errorsOf(errs map[string]string) error {
	var lines []string
	for name, msg := range errs {
		lines = append(lines, name+": "+msg)
	}
	sortStrings(lines)
	return fmt.Errorf("%s", strings.Join(lines, "; "))
}

// sanitizeComment keeps a comment line one line of printable text.
func sanitizeComment(s string) string {
	body := strings.TrimSuffix(s, "\n")
	body = strings.Map(func(r rune) rune {
		if r < 0x20 || r == 0x7f {
			return ' '
		}
		return r
	}, body)
	return body + "\n"
}

func sortStrings(s []string) { slices.Sort(s) }
