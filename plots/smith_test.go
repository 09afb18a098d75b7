package plots

import (
	"math"
	"math/cmplx"
	"testing"
)

const geomTol = 1e-12

// onArc reports whether g lies within the angular extent of the arc
// (centre, start, sweep) returned by reactanceArc.
func onArc(g, centre complex128, start, sweep float64) bool {
	a := cmplx.Phase(g - centre)
	d := math.Mod(a-start+6*math.Pi, 2*math.Pi) // angle from start, counter-clockwise
	if sweep < 0 {
		d = math.Mod(start-a+6*math.Pi, 2*math.Pi)
	}
	return d <= math.Abs(sweep)+1e-9
}

func TestSmithGridThroughImpedance(t *testing.T) {
	// Γ = (z - 1)/(z + 1) worked by hand, e.g. for z = 1 + j:
	// j/(2 + j) = j(2 - j)/5 = (1 + 2j)/5.
	tests := []struct {
		r, x      float64
		wantGamma complex128
	}{
		{1, 1, complex(0.2, 0.4)},
		{1, -1, complex(0.2, -0.4)},
		{0.5, 0.5, complex(-0.2, 0.4)},       // (-0.5+0.5j)/(1.5+0.5j) = (-0.5+j)/2.5
		{2, -5, complex(28.0/34, -10.0/34)},  // (1-5j)/(3-5j) = (28-10j)/34
		{0.2, 2, complex(3.04/5.44, 4/5.44)}, // (-0.8+2j)/(1.2+2j) = (3.04+4j)/5.44
	}
	for _, tt := range tests {
		z := complex(tt.r, tt.x)
		g := gammaOf(z)
		if cmplx.Abs(g-tt.wantGamma) > geomTol {
			t.Errorf("Γ(%v) = %v, want %v (worked by hand)", z, g, tt.wantGamma)
		}
		rc, rr := resistanceCircle(tt.r)
		if d := cmplx.Abs(g - rc); math.Abs(d-rr) > geomTol {
			t.Errorf("Γ(%v) = %v is %g from the r = %g circle's centre %v, want its radius %g", z, g, d, tt.r, rc, rr)
		}
		xc, xr, start, sweep := reactanceArc(tt.x)
		if d := cmplx.Abs(g - xc); math.Abs(d-xr) > geomTol {
			t.Errorf("Γ(%v) = %v is %g from the x = %g arc's centre %v, want its radius %g", z, g, d, tt.x, xc, xr)
		}
		if !onArc(g, xc, start, sweep) {
			t.Errorf("Γ(%v) = %v lies on the x = %g circle but outside the drawn arc (start %g, sweep %g rad)", z, g, tt.x, start, sweep)
		}
	}
}

func TestReactanceArcStaysInsideChart(t *testing.T) {
	for _, x := range []float64{0.2, 0.5, 1, 2, 5, -0.2, -0.5, -1, -2, -5} {
		centre, radius, start, sweep := reactanceArc(x)
		pts := circlePoints(centre, radius, start, sweep)
		if first := pts[0]; cmplx.Abs(first-1) > 1e-9 {
			t.Errorf("x = %g: arc starts at %v, want Γ = 1 (r = ∞)", x, first)
		}
		if last, want := pts[len(pts)-1], gammaOf(complex(0, x)); cmplx.Abs(last-want) > 1e-9 {
			t.Errorf("x = %g: arc ends at %v, want Γ(j%g) = %v on the rim", x, last, x, want)
		}
		if (x > 0) != (imag(pts[len(pts)/2]) > 0) {
			t.Errorf("x = %g: arc midpoint %v is in the wrong half plane (inductive above, capacitive below)", x, pts[len(pts)/2])
		}
		for _, p := range pts {
			if cmplx.Abs(p) > 1+1e-9 {
				t.Errorf("x = %g: arc point %v lies outside the unit circle", x, p)
				break
			}
		}
	}
}

func TestResistanceCircleMeetsRealAxis(t *testing.T) {
	// A constant-r circle crosses the real axis at Γ(r) = (r-1)/(r+1) and
	// at Γ = 1, where every circle touches the rim.
	for _, r := range []float64{0.2, 0.5, 1, 2, 5} {
		c, rad := resistanceCircle(r)
		left := complex((r-1)/(r+1), 0)
		if math.Abs(cmplx.Abs(left-c)-rad) > geomTol || math.Abs(cmplx.Abs(1-c)-rad) > geomTol {
			t.Errorf("r = %g circle (centre %v, radius %g) misses %v or 1", r, c, rad, left)
		}
	}
}

func TestSmithTraceMarkers(t *testing.T) {
	f := smithFrame{radius: 200}
	tr := SmithTrace{
		FrequencyHz: []float64{1e6, 1e7, 1e8, 1e9, 2.45e9},
		Gamma:       []complex128{0.9, 0.5i, cmplx.NaN(), -0.5, -0.5i},
	}
	ms := tr.markers(f)
	got := map[string]markerKind{}
	for _, m := range ms {
		got[m.label] = m.kind
	}
	// 1 MHz is the first point and 2.45 GHz the last; 10 MHz is a decade
	// between good points; 100 MHz is NaN, so neither it nor its
	// neighbours' interpolation may be drawn; 1 GHz is a fifth of a decade
	// from neither end, so it is kept.
	want := map[string]markerKind{"1 MHz": markerFirst, "2.45 GHz": markerLast, "10 MHz": markerDecade, "1 GHz": markerDecade}
	if len(got) != len(want) {
		t.Errorf("markers %v, want %v", got, want)
	}
	for l, k := range want {
		if got[l] != k {
			t.Errorf("marker %q: kind %d, want %d (all: %v)", l, got[l], k, got)
		}
	}
	if g, ok := tr.interpolate(1e7); !ok || g != 0.5i {
		t.Errorf("Γ at a sweep frequency interpolates to %v, %v; want the point itself, 0.5i", g, ok)
	}
	// Halfway in log frequency between 1 GHz and 2.45 GHz.
	mid := math.Sqrt(1e9 * 2.45e9)
	if g, ok := tr.interpolate(mid); !ok || cmplx.Abs(g-complex(-0.25, -0.25)) > 1e-12 {
		t.Errorf("Γ at %g Hz = %v, %v; want -0.25-0.25i, the mean of its neighbours", mid, g, ok)
	}
}
