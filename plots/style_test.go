package plots

import (
	"image/color"
	"math"
	"testing"
)

// Colour-vision deficiency simulation matrices for severity 1.0, applied
// to linear RGB: Machado, Oliveira and Fernandes, "A Physiologically-based
// Model for Simulation of Color Vision Deficiency", IEEE Transactions on
// Visualization and Computer Graphics 15(6), 2009, table of matrices in
// the supplementary material.
var visionSimulations = map[string][3][3]float64{
	"normal":       {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}},
	"protanopia":   {{0.152286, 1.052583, -0.204868}, {0.114503, 0.786281, 0.099216}, {-0.003882, -0.048116, 1.051998}},
	"deuteranopia": {{0.367322, 0.860646, -0.227968}, {0.280085, 0.672501, 0.047413}, {-0.011820, 0.042940, 0.968881}},
	"tritanopia":   {{1.255528, -0.076749, -0.178779}, {-0.078411, 0.930809, 0.147602}, {0.004733, 0.691367, 0.303900}},
}

// linearRGB undoes the sRGB transfer curve (IEC 61966-2-1).
func linearRGB(c color.Color) [3]float64 {
	r, g, b, _ := c.RGBA()
	f := func(v uint32) float64 {
		x := float64(v) / 0xffff
		if x <= 0.04045 {
			return x / 12.92
		}
		return math.Pow((x+0.055)/1.055, 2.4)
	}
	return [3]float64{f(r), f(g), f(b)}
}

// cieLab converts linear sRGB to CIE L*a*b* with the D65 white point.
func cieLab(c [3]float64) [3]float64 {
	x := 0.4124*c[0] + 0.3576*c[1] + 0.1805*c[2]
	y := 0.2126*c[0] + 0.7152*c[1] + 0.0722*c[2]
	z := 0.0193*c[0] + 0.1192*c[1] + 0.9505*c[2]
	f := func(t float64) float64 {
		if t > 216.0/24389 {
			return math.Cbrt(t)
		}
		return (24389.0/27*t + 16) / 116
	}
	fx, fy, fz := f(x/0.95047), f(y), f(z/1.08883)
	return [3]float64{116*fy - 16, 500 * (fx - fy), 200 * (fy - fz)}
}

func TestPaletteApartUnderColourBlindness(t *testing.T) {
	const minDelta = 20 // CIE76; about 2.3 is a just-noticeable difference
	for name, m := range visionSimulations {
		lab := make([][3]float64, len(Palette))
		for i, c := range Palette {
			lin := linearRGB(c)
			var sim [3]float64
			for r := range 3 {
				for k := range 3 {
					sim[r] += m[r][k] * lin[k]
				}
				sim[r] = math.Min(1, math.Max(0, sim[r]))
			}
			lab[i] = cieLab(sim)
		}
		for i := range lab {
			for j := i + 1; j < len(lab); j++ {
				d := math.Sqrt(sq(lab[i][0]-lab[j][0]) + sq(lab[i][1]-lab[j][1]) + sq(lab[i][2]-lab[j][2]))
				if d < minDelta {
					t.Errorf("%s: palette colours %d and %d are only ΔE %.1f apart, want at least %d so traces stay distinguishable", name, i, j, d, minDelta)
				}
			}
		}
	}
}

func sq(x float64) float64 { return x * x }

func TestPaletteAndDashesPair(t *testing.T) {
	// Every palette position needs its own dash pattern, so that a trace
	// keeps a distinct look when printed in grey.
	if len(dashPatterns) != len(Palette) {
		t.Errorf("%d dash patterns for %d colours", len(dashPatterns), len(Palette))
	}
}
