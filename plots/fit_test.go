package plots

import (
	"math"
	"os"
	"path/filepath"
	"testing"

	"qpoint/bias/diode"
	"qpoint/bias/extract"
	"qpoint/bias/measured"
)

// demoFit fits the demo measurements of testdata/fit, for the golden fit
// figures of TestGoldenAnalysis.
func demoFit(t *testing.T) *extract.Result {
	t.Helper()
	read := func(name string) []measured.Point {
		f, err := os.Open(filepath.Join("..", "testdata", "fit", name))
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		tab, err := measured.Read(f)
		if err != nil {
			t.Fatal(err)
		}
		return tab.Points
	}
	r, err := extract.Fit(extract.Data{Current: read("detector_iv.csv"), Capacitance: read("detector_cv.csv")}, extract.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestFitFiguresSparse: a fit with only forward points gives one figure,
// and figures of results with odd points (a single point per
// temperature, residuals that are not finite) still render.
func TestFitFiguresSparse(t *testing.T) {
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality = 1e-12, 1
	var pts []measured.Point
	d := diode.New(p, 300.15)
	for k := range 6 {
		i := math.Pow(10, -9+float64(k))
		pts = append(pts, measured.Point{Voltage: d.NVT() * math.Log1p(i/1e-12), Value: i})
	}
	r, err := extract.Fit(extract.Data{Current: pts}, extract.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	figs := FitFigures(r)
	if len(figs) != 1 || figs[0].Name != "fit-forward" {
		t.Fatalf("%d figures for forward points alone, want fit-forward only", len(figs))
	}
	r.Forward = append(r.Forward, extract.Residual{Voltage: 0.3, Measured: 1e-6, Model: math.NaN(), TemperatureK: 350, Residual: math.NaN()})
	r.Capacitance = []extract.Residual{{Voltage: -1, Measured: 1e-13, Model: 1e-13, TemperatureK: 300.15}}
	r.Reverse = []extract.Residual{{Voltage: -1, Measured: -1e-12, Model: -1e-12, TemperatureK: 300.15}}
	for _, f := range FitFigures(r) {
		checkSVG(t, f.Name, render(t, f, "svg"))
	}
}
