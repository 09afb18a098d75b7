package ac

import (
	"fmt"
	"math"
)

// Frequency limits of a sweep.
const (
	MinFrequencyHz = 1e-3
	MaxFrequencyHz = 1e12
)

// LogGrid returns frequencies from fromHz to toHz, both included, spaced
// evenly in log frequency with perDecade points per decade.
func LogGrid(fromHz, toHz float64, perDecade int) ([]float64, error) {
	if err := checkRange(fromHz, toHz); err != nil {
		return nil, err
	}
	if perDecade < 1 {
		return nil, fmt.Errorf("points per decade must be at least 1, got %d", perDecade)
	}
	decades := math.Log10(toHz / fromHz)
	n := int(math.Ceil(decades*float64(perDecade)-1e-9)) + 1
	if n < 2 {
		n = 2
	}
	if fromHz == toHz {
		return []float64{fromHz}, nil
	}
	if n > 10_000_000 {
		return nil, fmt.Errorf("%d points is more than a sweep holds (10 million)", n)
	}
	f := make([]float64, n)
	for i := range f {
		f[i] = fromHz * math.Pow(10, decades*float64(i)/float64(n-1))
	}
	f[n-1] = toHz
	return f, nil
}

// LinearGrid returns points frequencies evenly spaced from fromHz to toHz.
func LinearGrid(fromHz, toHz float64, points int) ([]float64, error) {
	if err := checkRange(fromHz, toHz); err != nil {
		return nil, err
	}
	if points < 1 || points > 10_000_000 {
		return nil, fmt.Errorf("point count must be between 1 and 10 million, got %d", points)
	}
	if points == 1 {
		return []float64{fromHz}, nil
	}
	f := make([]float64, points)
	for i := range f {
		f[i] = fromHz + (toHz-fromHz)*float64(i)/float64(points-1)
	}
	f[points-1] = toHz
	return f, nil
}

// CheckFrequency reports whether f lies in the supported range.
func CheckFrequency(f float64) error {
	if !(f >= MinFrequencyHz && f <= MaxFrequencyHz) {
		return fmt.Errorf("frequency %g Hz is outside the supported range 1 mHz to 1 THz", f)
	}
	return nil
}

func checkRange(fromHz, toHz float64) error {
	if err := CheckFrequency(fromHz); err != nil {
		return err
	}
	if err := CheckFrequency(toHz); err != nil {
		return err
	}
	if toHz < fromHz {
		return fmt.Errorf("the sweep must rise: from %g Hz is above to %g Hz", fromHz, toHz)
	}
	return nil
}
