package balance_test

import (
	"fmt"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// The detector demo under two tones 10 MHz apart at -50 dBm each: the
// third-order intermodulation at the video port, and what the solve did.
func Example() {
	c, err := circuit.Load("../../testdata/demo/detector.yaml")
	if err != nil {
		panic(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		panic(err)
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		panic(err)
	}
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9, SecondToneHz: 2.46e9, EMF: ac.DBmToEMF(-50, 50)}
	r, err := balance.Solve(nw, d, balance.Settings{})
	if err != nil {
		panic(err)
	}
	fmt.Printf("IM3 %.1f dBc, IM2 %.1f dBc\n", r.IM3dBc(), r.IM2dBc())
	fmt.Printf("%s: %s truncation of order %d, %d products, %d Newton iterations\n",
		r.Stats.Method, r.Truncation(), r.Stats.Harmonics, r.Stats.Products, r.Stats.Iterations)
	// Output:
	// IM3 -88.5 dBc, IM2 -3.1 dBc
	// harmonic balance: diamond truncation of order 7, 57 products, 4 Newton iterations
}
