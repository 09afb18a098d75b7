// Command generate writes qpoint's demo measurements for `qpoint fit`: an
// invented low-barrier detector diode measured as a bench would measure
// it. The diode and the bench are our own; the files are demo data, not a
// record of any real part.
//
//	go run ./testdata/fit/generate -out testdata/fit
//
// The diode follows the circuit file's law exactly (so a fit can recover
// it) with one effect the law lacks: reverse leakage that grows by 12 %
// per volt (barrier lowering), which stays below the size that earns a
// caution. The bench adds Gaussian noise of 0.5 % of each reading plus
// 50 pA on currents and 2 fF on capacitances, sweeps the voltage in even
// steps, stops a forward sweep at a 60 mA compliance and prints readings
// to six digits.
package main

import (
	"flag"
	"fmt"
	"log"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"

	"qpoint/bias/diode"
)

// The invented diode, at 27 °C.
func part() diode.Params {
	p := diode.Defaults()
	p.SaturationCurrent = 2.4e-6
	p.Ideality = 1.07
	p.SeriesResistance = 14
	p.ZeroBiasCapacitance = 0.16e-12
	p.BuiltInPotential = 0.32
	p.Grading = 0.42
	p.BreakdownVoltage = 3.1
	p.BreakdownCurrent = 10e-6
	p.GapEnergy = 0.69
	p.SaturationExponent = 2
	return p
}

func main() {
	out := flag.String("out", "testdata/fit", "directory for the files")
	flag.Parse()
	rng := rand.New(rand.NewPCG(2026, 18))
	p := part()
	reading := func(v, rel, abs float64) float64 { return v*(1+rel*rng.NormFloat64()) + abs*rng.NormFloat64() }

	var iv strings.Builder
	iv.WriteString("# Demo I–V measurements of an invented low-barrier detector diode\n")
	iv.WriteString("# (synthetic, written by testdata/fit/generate; not a real part).\n")
	iv.WriteString("# Forward sweeps at -40, 27 and 85 °C; a reverse sweep into breakdown at 27 °C.\n")
	iv.WriteString("voltage [V], current [mA], temperature [°C]\n")
	for _, tc := range []float64{-40, 27, 85} {
		d := diode.New(p, diode.ZeroCelsius+tc)
		if tc == 27 {
			for v := -4.0; v <= -0.1+1e-9; v += 0.1 {
				i, _ := d.TerminalCurrent(v)
				i -= 0.12 * -v * d.SaturationCurrent // leakage the law lacks
				fmt.Fprintf(&iv, "%.3f, %.6g, %g\n", v, 1e3*reading(i, 0.005, 50e-12), tc)
			}
		}
		for k := 1; ; k++ {
			v := 0.015*float64(k) - 0.01
			i, _ := d.TerminalCurrent(v)
			if i > 60e-3 {
				break
			}
			fmt.Fprintf(&iv, "%.3f, %.6g, %g\n", v, 1e3*reading(i, 0.005, 50e-12), tc)
		}
	}
	var cv strings.Builder
	cv.WriteString("# Demo C–V measurements of the same invented detector diode at 27 °C,\n")
	cv.WriteString("# package capacitance removed (synthetic, written by testdata/fit/generate).\n")
	cv.WriteString("voltage [V], capacitance [pF]\n")
	d := diode.New(p, diode.ZeroCelsius+27)
	for k := 0; k <= 41; k++ {
		v := -4 + 0.1*float64(k)
		c := d.Charge(v).D1
		fmt.Fprintf(&cv, "%.2f, %.6g\n", v, 1e12*reading(c, 0.005, 2e-15))
	}
	for name, text := range map[string]string{"detector_iv.csv": iv.String(), "detector_cv.csv": cv.String()} {
		if err := os.WriteFile(filepath.Join(*out, name), []byte(text), 0o644); err != nil {
			log.Fatal(err)
		}
	}
}
