package balance

import (
	"testing"

	"qpoint/ac"
	"qpoint/ac/internal/fixture"
	"qpoint/bias/circuit"
)

// fileDrive builds the drive a circuit's analysis.distortion section
// describes (a peak voltage is what the generator delivers into a
// matched load, half its EMF).
func fileDrive(tb testing.TB, c *circuit.Circuit) ac.Drive {
	tb.Helper()
	d := c.Analysis.Distortion
	drive := ac.Drive{Input: -1, Output: ac.Output{Port: -1, Node: d.Output}, FrequencyHz: d.FrequencyHz}
	for i, p := range c.Ports {
		if p.Name == d.Input {
			drive.Input = i
		}
		if p.Name == d.Output {
			drive.Output = ac.Output{Port: i}
		}
	}
	if drive.Input < 0 {
		tb.Fatalf("input %q is not a port", d.Input)
	}
	z0 := c.Ports[drive.Input].Impedance
	if d.Level.IsPower {
		drive.EMF = ac.DBmToEMF(d.Level.DBm, z0)
	} else {
		drive.EMF = 2 * d.Level.PeakVolts
	}
	return drive
}

var (
	network   = fixture.Network
	linearise = fixture.Linearise
	demo      = fixture.Demo
	ladder    = fixture.Ladder
	besselI   = fixture.BesselI
)
