package touchstone_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"strings"

	"qpoint/ac/touchstone"
)

// A two-port at two frequencies written in version 1.1's magnitude-angle
// form, and read back. Version 1.1 puts a two-port's whole frequency on
// one line in the order S11 S21 S12 S22 (the specification's own rule for
// two-ports).
func ExampleWrite() {
	ports := []touchstone.Port{{Name: "in", Impedance: 50}, {Name: "out", Impedance: 50}}
	points := []touchstone.Point{
		{FrequencyHz: 1e9, S: [][]complex128{{0.1, 0.02i}, {-0.5i, 0.2}}},
		{FrequencyHz: 2e9, S: [][]complex128{{0.2, 0.04i}, {-0.25i, 0.3}}},
	}
	var b strings.Builder
	if err := touchstone.Write(&b, ports, points, touchstone.FormatMA, []string{"an example"}); err != nil {
		fmt.Println(err)
		return
	}
	os.Stdout.WriteString(b.String())
	_, back, err := touchstone.Read(strings.NewReader(b.String()), 2)
	if err != nil {
		fmt.Println(err)
		return
	}
	s21 := back[1].S[1][0]
	fmt.Printf("read back: %d points, S21 at 2 GHz = %.3g at %.1f°\n", len(back), cmplx.Abs(s21), cmplx.Phase(s21)*180/math.Pi)
	// Output:
	// ! S-parameters written by qpoint
	// ! an example
	// ! Port 1: in, reference 50 ohm
	// ! Port 2: out, reference 50 ohm
	// ! Each frequency in Hz is followed by S11 S21 S12 S22, each as magnitude and angle in degrees.
	// # Hz S MA R 50
	// 1e+09 0.1 0 0.5 -90 0.02 90 0.2 0
	// 2e+09 0.2 0 0.25 -90 0.04 90 0.3 0
	// read back: 2 points, S21 at 2 GHz = 0.25 at -90.0°
}
