package plots

import (
	"math"
	"math/cmplx"

	"qpoint/ac"
)

// Synthetic sweeps built by hand from closed-form networks, so that the
// figures are tested without the rest of the analysis chain.

// logSweep returns perDecade points a decade from fromHz to toHz.
func logSweep(fromHz, toHz float64, perDecade int) []float64 {
	n := int(math.Round(math.Log10(toHz/fromHz)*float64(perDecade))) + 1
	fs := make([]float64, n)
	for i := range fs {
		fs[i] = fromHz * math.Pow(toHz/fromHz, float64(i)/float64(n-1))
	}
	fs[n-1] = toHz // exactly, for the end label
	return fs
}

// lowPass is a series 100 Ω resistor into a shunt 10 pF capacitor between
// two 50 Ω ports, with a probe on the capacitor. Its S-parameters follow
// from the cascade's ABCD matrix [[1 + jωRC, R], [jωC, 1]] by the
// ABCD-to-S conversion of Pozar, "Microwave Engineering", 4th ed., table
// 4.2; the group delay is the derivative of arg S21 taken by a central
// difference.
func lowPass() *ac.Response {
	const (
		resistance  = 100.0
		capacitance = 10e-12
		z0          = 50.0
	)
	s := func(hz float64) (s11, s12, s21, s22 complex128) {
		jw := complex(0, 2*math.Pi*hz)
		a, b, c, d := 1+jw*resistance*capacitance, complex(resistance, 0), jw*capacitance, complex(1, 0)
		den := a + b/z0 + c*z0 + d
		return (a + b/z0 - c*z0 - d) / den, 2 * (a*d - b*c) / den, 2 / den, (-a + b/z0 - c*z0 + d) / den
	}
	r := &ac.Response{
		Ports:  []ac.PortInfo{{Name: "in", Impedance: z0}, {Name: "out", Impedance: z0}},
		Probes: []string{"filter"},
	}
	for _, hz := range logSweep(1e6, 10e9, 20) {
		s11, s12, s21, s22 := s(hz)
		_, _, up, _ := s(hz * (1 + 1e-6))
		_, _, down, _ := s(hz * (1 - 1e-6))
		delay := -(cmplx.Phase(up) - cmplx.Phase(down)) / (2 * math.Pi * hz * 2e-6)
		r.Points = append(r.Points, ac.Point{
			FrequencyHz:    hz,
			S:              [][]complex128{{s11, s12}, {s21, s22}},
			InputImpedance: []complex128{z0 * (1 + s11) / (1 - s11), z0 * (1 + s22) / (1 - s22)},
			Probes:         []complex128{s21 / 2}, // the capacitor is port 2's node: V = S21·E/2
			GroupDelay:     delay,
		})
	}
	return r
}

// detectorPort is a one-port shaped like a small-signal detector diode at
// a low bias: 1 nH of lead inductance and 5 Ω of series resistance in
// series with a 2 kΩ junction resistance shunted by 0.2 pF, seen from a
// 50 Ω port.
func detectorPort() *ac.Response {
	const z0 = 50.0
	zin := func(hz float64) complex128 {
		w := 2 * math.Pi * hz
		junction := 2000 / complex(1, w*2000*0.2e-12)
		return complex(5, w*1e-9) + junction
	}
	r := &ac.Response{Ports: []ac.PortInfo{{Name: "rf", Impedance: z0}}}
	for _, hz := range logSweep(10e6, 20e9, 25) {
		z := zin(hz)
		s11 := (z - z0) / (z + z0)
		gp := func(f float64) float64 { z := zin(f); return cmplx.Phase((z - z0) / (z + z0)) }
		delay := -(gp(hz*(1+1e-6)) - gp(hz*(1-1e-6))) / (2 * math.Pi * hz * 2e-6)
		r.Points = append(r.Points, ac.Point{
			FrequencyHz:    hz,
			S:              [][]complex128{{s11}},
			InputImpedance: []complex128{z},
			GroupDelay:     delay,
		})
	}
	return r
}
