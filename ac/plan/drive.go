package plan

import (
	"fmt"

	"qpoint/ac"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
)

// DriveRequest asks for a distortion drive. Zero fields take the file's
// analysis.distortion, else the policy's defaults.
type DriveRequest struct {
	Input, Output string
	FrequencyHz   float64
	Level         *circuit.Level // nil: the file's, else DefaultLevelDBm
	// SecondToneHz adds a second tone of the same level; DropSecondTone
	// drops the file's.
	SecondToneHz   float64
	DropSecondTone bool
}

// Drive is a resolved drive: the signal path, the generator's EMF at
// the input, and the level as available power.
type Drive struct {
	Path
	ac.Drive
	LevelDBm float64 // available power per tone behind the input's reference impedance
}

// ResolveDrive resolves a distortion drive. A level given as a peak
// voltage is what the generator delivers into a matched load, half its
// EMF; every level is held to -200 to +90 dBm of available power at the
// input port, whatever form it was given in.
func ResolveDrive(c *circuit.Circuit, r DriveRequest) (*Drive, error) {
	if len(c.Ports) == 0 {
		return nil, requestErr("input", "%s: the circuit has no ports; distortion needs an input port (add a `ports:` list)", c.File)
	}
	p, err := SignalPath(c, r.Input, r.Output)
	if err != nil {
		return nil, err
	}
	def := c.Analysis.Distortion
	freq := def.FrequencyHz
	if r.FrequencyHz != 0 {
		freq = r.FrequencyHz
	}
	if freq == 0 {
		return nil, requestErr("frequency", "no signal frequency: give one (e.g. 2.45GHz) or analysis.distortion.frequency in the file")
	}
	if err := ac.CheckFrequency(freq); err != nil {
		return nil, originErr(c, r.FrequencyHz != 0, "frequency", "distortion", def.Pos, "%w", err)
	}
	lv := circuit.Level{DBm: DefaultLevelDBm, IsPower: true}
	if def.Set {
		lv = def.Level
	}
	if r.Level != nil {
		lv = *r.Level
	}
	z0 := c.Ports[p.Input].Impedance
	d := &Drive{Path: p, LevelDBm: lv.DBm}
	if !lv.IsPower {
		d.LevelDBm = ac.EMFToDBm(2*lv.PeakVolts, z0)
	}
	// A peak voltage within the voltage range can still be a power
	// beyond the level range at the port's impedance (1 MV into 50 Ω is
	// +130 dBm): the limits hold for the level, however it is written.
	if !(d.LevelDBm >= circuit.MinLevelDBm && d.LevelDBm <= circuit.MaxLevelDBm) {
		return nil, originErr(c, r.Level != nil, "level", "distortion", def.Pos,
			"%s at port %s's %s is %.4g dBm; accepted: %g dBm to %+g dBm of available power (a peak voltage into a matched load of that port)",
			levelText(lv), p.InputName, si.Format(z0, "Ω", 4), d.LevelDBm, float64(circuit.MinLevelDBm), float64(circuit.MaxLevelDBm))
	}
	second := def.SecondToneHz
	if r.DropSecondTone {
		second = 0
	}
	if r.SecondToneHz != 0 {
		second = r.SecondToneHz
	}
	if second != 0 {
		if err := ac.CheckFrequency(second); err != nil {
			return nil, originErr(c, r.SecondToneHz != 0, "second-tone", "distortion", def.Pos, "%w", err)
		}
		if second == freq {
			return nil, requestErr("second-tone", "must differ from the signal frequency %s", si.Format(freq, "Hz", 6))
		}
	}
	d.Drive = ac.Drive{Input: p.Input, Output: p.Output, FrequencyHz: freq, EMF: ac.DBmToEMF(d.LevelDBm, z0), SecondToneHz: second}
	return d, nil
}

// levelText writes a level as the user gave it.
func levelText(l circuit.Level) string {
	if l.IsPower {
		return fmt.Sprintf("%g dBm", l.DBm)
	}
	return si.Format(l.PeakVolts, "V", 4) + " peak"
}

// OneTone returns the drive with its second tone dropped.
func (d *Drive) OneTone() ac.Drive {
	one := d.Drive
	one.SecondToneHz = 0
	return one
}
