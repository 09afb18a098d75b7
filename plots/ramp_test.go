package plots

import (
	"math"
	"testing"
)

// TestRampOrderedUnderColourBlindness: the ramp's lightness falls
// strictly from its pale end to its dark end, for normal vision and under
// simulated protanopia, deuteranopia and tritanopia (Machado, Oliveira and
// Fernandes 2009, the matrices of style_test.go), so that the order of the
// values reads the same for every viewer and in greyscale.
func TestRampOrderedUnderColourBlindness(t *testing.T) {
	for name, m := range visionSimulations {
		prev := math.Inf(1)
		for i, c := range rampTable {
			lin := linearRGB(c)
			var sim [3]float64
			for r := range 3 {
				for k := range 3 {
					sim[r] += m[r][k] * lin[k]
				}
				sim[r] = math.Min(1, math.Max(0, sim[r]))
			}
			l := cieLab(sim)[0]
			// Eight-bit rounding can hold two neighbours level; it must
			// never turn the order round.
			if l > prev+0.05 {
				t.Errorf("%s: ramp step %d has lightness %.2f, above the %.2f of step %d; want it to fall throughout", name, i, l, prev, i-1)
				break
			}
			prev = math.Min(prev, l)
		}
	}
	if l0, l1 := cieLab(linearRGB(rampTable[0]))[0], cieLab(linearRGB(rampTable[rampSteps-1]))[0]; l0-l1 < 75 {
		t.Errorf("ramp lightness runs from %.1f to %.1f; want at least 75 units between the ends so that the order reads in greyscale", l0, l1)
	}
}

// TestRampEvenSteps: equal steps along the ramp are close to equal steps
// of CIE76 colour difference, so that no part of the value range is
// magnified or squashed (the ramp is resampled by arc length in L*a*b*;
// what remains is eight-bit rounding).
func TestRampEvenSteps(t *testing.T) {
	const stride = 16
	var steps []float64
	for i := stride; i < rampSteps; i += stride {
		a, b := cieLab(linearRGB(rampTable[i-stride])), cieLab(linearRGB(rampTable[i]))
		steps = append(steps, math.Sqrt(sq(a[0]-b[0])+sq(a[1]-b[1])+sq(a[2]-b[2])))
	}
	lo, hi := math.Inf(1), 0.0
	for _, d := range steps {
		lo, hi = math.Min(lo, d), math.Max(hi, d)
	}
	if hi/lo > 1.25 {
		t.Errorf("ramp steps of %d entries span ΔE %.2f to %.2f; want them within 25 %% of each other: %.2f", stride, lo, hi, steps)
	}
}

func TestRampEnds(t *testing.T) {
	if Ramp(-1) != Ramp(0) || Ramp(2) != Ramp(1) {
		t.Error("Ramp does not clamp t to [0, 1]")
	}
	if Ramp(math.NaN()) != missingFill {
		t.Error("Ramp(NaN) is not the missing-value grey")
	}
	// The pale end must stand off the white page, and the hatch grey of
	// missing cells must not be mistaken for a ramp colour: neutral where
	// every ramp colour has some chroma.
	lab := cieLab(linearRGB(missingFill))
	if c := math.Hypot(lab[1], lab[2]); c > 3 {
		t.Errorf("missing-value grey has chroma %.1f; want it neutral", c)
	}
	for i, c := range rampTable {
		l := cieLab(linearRGB(c))
		if math.Hypot(l[1], l[2]) < 6 {
			t.Errorf("ramp step %d has chroma %.1f; want every ramp colour tinted, apart from the neutral missing grey", i, math.Hypot(l[1], l[2]))
			break
		}
	}
}
