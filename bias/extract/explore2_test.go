package extract

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"qpoint/bias/diode"
	"qpoint/bias/measured"
)

func show(r *Result) {
	for _, v := range r.Values {
		fmt.Printf("%-32s %12.6g ± %-10.3g %s %s\n", v.Key, v.Value, v.Error, v.Unit, v.Status)
	}
	for _, c := range r.Correlations {
		fmt.Printf("corr %s %s %.4f\n", c.A, c.B, c.Coefficient)
	}
	for _, c := range r.Cautions {
		fmt.Printf("caution %s %s: %s\n", c.Kind, c.Key, c.Message)
	}
	fmt.Printf("%+v\n%+v\n", r.Residuals, r.Stats)
}

func TestExplore2(t *testing.T) {
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance = 3e-6, 1.05, 20
	p.GapEnergy, p.SaturationExponent = 0.69, 2
	p.BreakdownVoltage, p.BreakdownCurrent = 3.8, 1e-4
	rng := rand.New(rand.NewPCG(7, 2))
	var pts []measured.Point
	for _, tk := range []float64{233.15, 300.15, 358.15} {
		pts = append(pts, forwardPoints(p, tk, 1e-8, 3e-2, 30, 0.01, rng)...)
	}
	// reverse at 300.15
	d := diode.New(p, 300.15)
	for k := range 30 {
		v := -0.2 - 4.0*float64(k)/29
		i, _ := d.TerminalCurrent(v)
		i *= 1 + 0.01*rng.NormFloat64()
		pts = append(pts, measured.Point{Voltage: v, Value: i, TemperatureK: 300.15})
	}
	r, err := Fit(Data{Current: pts}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	show(r)
	_ = math.Pi
}
