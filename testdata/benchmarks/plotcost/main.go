// Command plotcost draws BENCHMARKS.md's figure: the cost of one sweep
// point against the number of unknowns n, on log-log axes, for the dense
// LU and the reduced engine (in whichever form its choice takes), with one
// n×n complex matrix-vector product as the O(n²) floor. It reads the
// output of
//
//	go test -run '^$' -bench Engines -benchtime 1x -count 5 ./ac/
//
// and takes the median of each metric over the runs:
//
//	go run ./testdata/benchmarks/plotcost -in testdata/benchmarks/engines.txt -out testdata/benchmarks/cost-vs-n.png
package main

import (
	"bufio"
	"flag"
	"fmt"
	"image/color"
	"log"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

type key struct {
	kind string // ladder or random
	n    int
	unit string
}

func main() {
	in := flag.String("in", "testdata/benchmarks/engines.txt", "benchmark output to read")
	out := flag.String("out", "testdata/benchmarks/cost-vs-n.png", "image to write (.png or .svg)")
	flag.Parse()
	vals, err := read(*in)
	if err != nil {
		log.Fatal(err)
	}
	if err := draw1(vals, *out); err != nil {
		log.Fatal(err)
	}
}

// read collects every metric of every BenchmarkEngines line.
func read(path string) (map[key][]float64, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	vals := map[key][]float64{}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fields := strings.Fields(sc.Text())
		if len(fields) < 4 || !strings.HasPrefix(fields[0], "BenchmarkEngines/") {
			continue
		}
		// BenchmarkEngines/ladder/n=200-2
		parts := strings.Split(fields[0], "/")
		if len(parts) != 3 {
			continue
		}
		nStr := strings.TrimPrefix(parts[2], "n=")
		if i := strings.IndexByte(nStr, '-'); i >= 0 {
			nStr = nStr[:i]
		}
		n, err := strconv.Atoi(nStr)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", fields[0], err)
		}
		// fields[1] is the iteration count; then value-unit pairs.
		for i := 2; i+1 < len(fields); i += 2 {
			v, err := strconv.ParseFloat(fields[i], 64)
			if err != nil {
				return nil, fmt.Errorf("%s: %w", fields[0], err)
			}
			k := key{parts[1], n, fields[i+1]}
			vals[k] = append(vals[k], v)
		}
	}
	return vals, sc.Err()
}

func median(v []float64) float64 {
	s := slices.Clone(v)
	slices.Sort(s)
	if len(s)%2 == 1 {
		return s[len(s)/2]
	}
	return (s[len(s)/2-1] + s[len(s)/2]) / 2
}

// series returns the medians of one metric, in seconds, against n.
func series(vals map[key][]float64, kind, unit string) plotter.XYs {
	var xy plotter.XYs
	for k, v := range vals {
		if k.kind == kind && k.unit == unit {
			xy = append(xy, plotter.XY{X: float64(k.n), Y: median(v) * 1e-9})
		}
	}
	slices.SortFunc(xy, func(a, b plotter.XY) int { return int(a.X - b.X) })
	return xy
}

// timeTicks marks decades of seconds in SI units, minor ticks between.
type timeTicks struct{}

func (timeTicks) Ticks(min, max float64) []plot.Tick {
	names := map[int]string{-9: "1 ns", -8: "10 ns", -7: "100 ns", -6: "1 µs", -5: "10 µs", -4: "100 µs",
		-3: "1 ms", -2: "10 ms", -1: "100 ms", 0: "1 s"}
	var ts []plot.Tick
	for e := -9; e <= 0; e++ {
		d := math.Pow(10, float64(e))
		for m := 1; m < 10; m++ {
			v := float64(m) * d
			if v < min || v > max {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 {
				t.Label = names[e]
			}
			ts = append(ts, t)
		}
	}
	return ts
}

// sizeTicks marks the unknown counts 1-2-5 per decade.
type sizeTicks struct{}

func (sizeTicks) Ticks(min, max float64) []plot.Tick {
	var ts []plot.Tick
	for d := 1.0; d <= 1e4; d *= 10 {
		for m := 1; m < 10; m++ {
			v := float64(m) * d
			if v < min || v > max {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 || m == 2 || m == 5 {
				t.Label = strconv.Itoa(int(v))
			}
			ts = append(ts, t)
		}
	}
	return ts
}

func draw1(vals map[key][]float64, out string) error {
	p := plot.New()
	p.Title.Text = "Cost of one sweep point against network size"
	p.X.Label.Text = "unknowns n"
	p.Y.Label.Text = "seconds per frequency point"
	p.X.Scale, p.Y.Scale = plot.LogScale{}, plot.LogScale{}
	p.X.Tick.Marker, p.Y.Tick.Marker = sizeTicks{}, timeTicks{}
	p.X.Min, p.X.Max = 15, 700
	p.Y.Min, p.Y.Max = 2e-7, 0.3
	p.Add(plotter.NewGrid())
	p.Legend.Top, p.Legend.Left = true, true
	p.Legend.XOffs, p.Legend.YOffs = vg.Points(8), -vg.Points(6)
	p.Legend.TextStyle.Font.Size = vg.Points(9)

	blue := color.RGBA{0x1F, 0x4E, 0x89, 0xff}
	amber := color.RGBA{0xDB, 0x8A, 0x1F, 0xff}
	grey := color.RGBA{0x5A, 0x63, 0x6C, 0xff}
	traces := []struct {
		label, kind, unit string
		col               color.Color
		dash              []vg.Length
		glyph             draw.GlyphDrawer
	}{
		{"dense LU, ladder", "ladder", "lu-ns/pt", amber, nil, draw.CircleGlyph{}},
		{"dense LU, random", "random", "lu-ns/pt", amber, []vg.Length{vg.Points(5), vg.Points(3)}, draw.SquareGlyph{}},
		{"reduced, 1000 points (reduction included), ladder", "ladder", "reduced-ns/pt", blue, nil, draw.CircleGlyph{}},
		{"reduced, 1000 points (reduction included), random", "random", "reduced-ns/pt", blue, []vg.Length{vg.Points(5), vg.Points(3)}, draw.SquareGlyph{}},
		{"reduced, one point alone (reduction made), ladder", "ladder", "point-ns", blue, []vg.Length{vg.Points(1), vg.Points(2)}, draw.TriangleGlyph{}},
		{"one n×n complex mat-vec (gonum Zgemv), the O(n²) floor", "ladder", "matvec-ns", grey, []vg.Length{vg.Points(2), vg.Points(2)}, draw.CrossGlyph{}},
	}
	for _, tr := range traces {
		xy := series(vals, tr.kind, tr.unit)
		if len(xy) == 0 {
			return fmt.Errorf("no %s data for %s", tr.unit, tr.kind)
		}
		l, s, err := plotter.NewLinePoints(xy)
		if err != nil {
			return err
		}
		l.Color, l.Width, l.Dashes = tr.col, vg.Points(1.5), tr.dash
		s.Color, s.Shape, s.Radius = tr.col, tr.glyph, vg.Points(3)
		p.Add(l, s)
		p.Legend.Add(tr.label, l, s)
	}
	return p.Save(7*vg.Inch, 5*vg.Inch, out)
}
