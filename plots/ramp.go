package plots

import (
	"image/color"
	"math"
)

// The sequential colour ramp of the colour maps, "tideline": from a warm
// paper white through sage and sea-green to teal, harbour blue and a deep
// ink blue. It is built for this project as a path in CIE L*C*h° (D65):
// lightness falls from L* 97 to 16, so that the order of the values
// survives every kind of colour blindness and greyscale print; the hue
// turns from 88° to 282°, so that neighbouring values differ in hue as
// well as lightness; the chroma swells to 30 in the light half and stays
// within the sRGB gamut everywhere, so that no colour is clipped into a
// bright band. The path is then resampled at equal steps of CIE76 colour
// difference, so that equal steps of value look like equal steps of
// colour. TestRampOrderedUnderColourBlindness and TestRampEvenSteps check
// both.
const rampSteps = 256

var rampTable = buildRamp()

// Ramp returns the colour of the house sequential ramp at t, from the
// palest (t = 0) to the darkest (t = 1); t outside [0, 1] is clamped, and
// NaN gets the grey of missing values.
func Ramp(t float64) color.Color {
	switch {
	case math.IsNaN(t):
		return missingFill
	case t < 0:
		t = 0
	case t > 1:
		t = 1
	}
	return rampTable[int(math.Round(t*(rampSteps-1)))]
}

// rampLCh is the ramp's path before resampling: lightness, chroma and hue
// (degrees) at s from 0 to 1.
func rampLCh(s float64) (l, c, h float64) {
	l = 97 - 81*s
	h = 88 + 194*s
	c = 8 + 22*smoothstep(0, 0.35, s) - 8*smoothstep(0.4, 0.7, s) + 3*smoothstep(0.85, 1, s)
	return l, c, h
}

// smoothstep rises from 0 at a to 1 at b with zero slope at both ends.
func smoothstep(a, b, x float64) float64 {
	t := math.Min(1, math.Max(0, (x-a)/(b-a)))
	return t * t * (3 - 2*t)
}

func buildRamp() []color.RGBA {
	// Arc length of the path in L*a*b*, finely sampled.
	const fine = 4096
	lab := func(s float64) [3]float64 {
		l, c, h := rampLCh(s)
		r := h * math.Pi / 180
		return [3]float64{l, c * math.Cos(r), c * math.Sin(r)}
	}
	arc := make([]float64, fine+1)
	prev := lab(0)
	for i := 1; i <= fine; i++ {
		p := lab(float64(i) / fine)
		arc[i] = arc[i-1] + math.Sqrt((p[0]-prev[0])*(p[0]-prev[0])+(p[1]-prev[1])*(p[1]-prev[1])+(p[2]-prev[2])*(p[2]-prev[2]))
		prev = p
	}
	out := make([]color.RGBA, rampSteps)
	i := 0
	for k := range out {
		want := arc[fine] * float64(k) / (rampSteps - 1)
		for i < fine && arc[i+1] < want {
			i++
		}
		s := float64(i) / fine
		if i < fine && arc[i+1] > arc[i] {
			s += (want - arc[i]) / (arc[i+1] - arc[i]) / fine
		}
		out[k] = labToSRGB(rampLCh(math.Min(1, s)))
	}
	return out
}

// inGamut reports whether L*C*h° lies inside sRGB.
func inGamut(l, c, hDeg float64) bool {
	_, ok := labLinear(l, c, hDeg)
	return ok
}

// labLinear converts L*C*h° (D65) to linear sRGB, and reports whether the
// colour lies inside the gamut.
func labLinear(l, c, hDeg float64) ([3]float64, bool) {
	h := hDeg * math.Pi / 180
	a, b := c*math.Cos(h), c*math.Sin(h)
	// CIE L*a*b* to XYZ (CIE 15:2004, sec. 8.2.1), D65 white.
	fy := (l + 16) / 116
	fx, fz := fy+a/500, fy-b/200
	inv := func(f float64) float64 {
		if f > 6.0/29 {
			return f * f * f
		}
		return 3 * (6.0 / 29) * (6.0 / 29) * (f - 4.0/29)
	}
	x, y, z := 0.95047*inv(fx), inv(fy), 1.08883*inv(fz)
	// XYZ to linear sRGB (IEC 61966-2-1).
	rgb := [3]float64{
		3.2406*x - 1.5372*y - 0.4986*z,
		-0.9689*x + 1.8758*y + 0.0415*z,
		0.0557*x - 0.2040*y + 1.0570*z,
	}
	ok := true
	for _, v := range rgb {
		ok = ok && v >= -1e-9 && v <= 1+1e-9
	}
	return rgb, ok
}

// labToSRGB converts L*C*h° (D65) to 8-bit sRGB, lowering the chroma by
// bisection until the colour lies inside the sRGB gamut, so that lightness
// and hue are kept exactly.
func labToSRGB(l, c, hDeg float64) color.RGBA {
	rgb, ok := labLinear(l, c, hDeg)
	if !ok {
		lo, hi := 0.0, c
		for range 40 {
			mid := (lo + hi) / 2
			if inGamut(l, mid, hDeg) {
				lo = mid
			} else {
				hi = mid
			}
		}
		rgb, _ = labLinear(l, lo, hDeg)
	}
	enc := func(v float64) uint8 {
		v = math.Min(1, math.Max(0, v))
		if v <= 0.0031308 {
			v *= 12.92
		} else {
			v = 1.055*math.Pow(v, 1/2.4) - 0.055
		}
		return uint8(math.Round(v * 255))
	}
	return color.RGBA{R: enc(rgb[0]), G: enc(rgb[1]), B: enc(rgb[2]), A: 0xff}
}

// Cells of a colour map with no value (a step that did not solve) are
// hatched in greys that lie outside the ramp: neutral, and with a pattern
// no ramp colour has.
var (
	missingFill  = rgb(0xE3E6EA)
	missingHatch = rgb(0xA9B1B9)
)
