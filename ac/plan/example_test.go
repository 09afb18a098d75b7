package plan_test

import (
	"fmt"

	"qpoint/ac/plan"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// The detector demo's own analysis block supplies everything a request
// leaves out: the ports, the carrier and the level. The run sets the
// Volterra estimate beside the waveform and searches for the level where
// they part.
func ExampleRunDistortion() {
	c, err := circuit.Load("../../testdata/demo/detector.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := plan.ResolveDrive(c, plan.DriveRequest{})
	if err != nil {
		fmt.Println(err)
		return
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		fmt.Println(err)
		return
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := plan.RunDistortion(nw, d, plan.DistortionRequest{Validity: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s → %s at %.2f GHz, %.0f dBm available\n", d.InputName, d.OutputName, d.FrequencyHz/1e9, d.LevelDBm)
	for _, c := range res.Comparison[:2] {
		fmt.Printf("%-3s estimate %.3g V, waveform %.3g V\n", c.Name, c.Estimate, c.Waveform)
	}
	fmt.Printf("estimates hold within 0.5 dB up to %.0f dBm\n", res.Validity.LevelDBm)
	// Output:
	// rf → video at 2.45 GHz, -30 dBm available
	// dc  estimate 0.000348 V, waveform 0.000344 V
	// 1   estimate 2.19e-05 V, waveform 2.19e-05 V
	// estimates hold within 0.5 dB up to -26 dBm
}
