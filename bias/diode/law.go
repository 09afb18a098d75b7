package diode

// Law is a device law evaluated at one junction voltage: its value and its
// first three derivatives with respect to that voltage.
type Law struct {
	Value float64
	D1    float64 // d/dv
	D2    float64 // d²/dv²
	D3    float64 // d³/dv³
}

// Add returns the sum of two laws evaluated at the same voltage.
func (l Law) Add(o Law) Law {
	return Law{l.Value + o.Value, l.D1 + o.D1, l.D2 + o.D2, l.D3 + o.D3}
}

// Scale returns the law multiplied by a constant.
func (l Law) Scale(a float64) Law {
	return Law{a * l.Value, a * l.D1, a * l.D2, a * l.D3}
}

// Taylor returns the Taylor coefficients of the law about its voltage:
// k-th coefficient = (1/k!) d^k/dv^k, for k = 1, 2, 3.
func (l Law) Taylor() (c1, c2, c3 float64) {
	return l.D1, l.D2 / 2, l.D3 / 6
}
