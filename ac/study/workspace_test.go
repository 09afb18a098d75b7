package study

import (
	"fmt"
	"testing"

	"qpoint/ac"
	"qpoint/bias"
	"qpoint/bias/circuit"
)

// TestWorkspaceChangesNothing: a study, whose workers reuse one workspace
// for all their steps, gives the steps that a fresh workspace for every
// step gives along the same chains. The studies change what a workspace
// keeps from step to step: a diode's series resistance through zero (an
// unknown appears), the temperature (the diode devices), and a second
// axis of frequency; each step also runs a distortion estimate.
func TestWorkspaceChangesNothing(t *testing.T) {
	att, det := demo(t, "attenuator"), demo(t, "detector")
	temperature := axis(t, att, "temperature", 250, 350, 3)
	cases := []struct {
		name string
		c    *circuit.Circuit
		s    Settings
	}{
		{"attenuator R_S × temperature", att, Settings{
			Axis: axis(t, att, "attenuator_diode.series_resistance", 0, 4, 11), Second: &temperature,
			FrequenciesHz: []float64{100e6, 900e6},
			Drive:         ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 900e6, EMF: ac.DBmToEMF(-10, 50)},
		}},
		{"detector Vcc × frequency", det, Settings{
			Axis: axis(t, det, "Vcc.value", 0, 3.3, 10), Second: &Axis{Values: []float64{1e9, 2.45e9}}, SecondIsFrequency: true,
			Drive: ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9, EMF: ac.DBmToEMF(-30, 50)},
		}},
	}
	for _, tc := range cases {
		tc.s.Workers = 2
		r, err := Run(tc.c, tc.s)
		if err != nil {
			t.Fatal(err)
		}
		for j := 0; j < r.Shape[1]; j++ {
			for from := 0; from < r.Shape[0]; from += chainLength {
				var prev *bias.Point
				for i := from; i < min(from+chainLength, r.Shape[0]); i++ {
					var st Step
					prev = runStep(tc.c, tc.s, i, j, prev, &st, new(workspace))
					if st.Err != nil {
						t.Fatalf("%s: step (%d, %d): %v", tc.name, i, j, st.Err)
					}
					if got, want := fmt.Sprintf("%+v", *r.At(i, j)), fmt.Sprintf("%+v", st); got != want {
						t.Fatalf("%s: step (%d, %d) differs from its solve in a fresh workspace:\n%s\nagainst\n%s", tc.name, i, j, got, want)
					}
				}
			}
		}
	}
}
