package report

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"

	"qpoint/ac"
	"qpoint/bias/si"
)

// PickRows chooses up to n points spread evenly over the sweep's index
// range, always including the first and last.
func PickRows(total, n int) []int {
	if n < 2 || total <= n {
		idx := make([]int, total)
		for i := range idx {
			idx[i] = i
		}
		return idx
	}
	var idx []int
	for k := 0; k < n; k++ {
		i := int(math.Round(float64(k) * float64(total-1) / float64(n-1)))
		if len(idx) == 0 || idx[len(idx)-1] != i {
			idx = append(idx, i)
		}
	}
	return idx
}

// DB is |x| in decibels.
func DB(x complex128) float64 { return 20 * math.Log10(cmplx.Abs(x)) }

// Degrees is the phase of x in degrees.
func Degrees(x complex128) float64 { return cmplx.Phase(x) * 180 / math.Pi }

// FormatDB prints decibels to two decimals: -∞ for nothing, "< -200"
// below numerical noise, a dash for no value.
func FormatDB(v float64) string {
	if math.IsInf(v, -1) {
		return "-∞"
	}
	if math.IsNaN(v) || math.IsInf(v, 1) {
		return "—"
	}
	// Below -200 dB a transfer is numerical noise of a perfectly balanced
	// or isolated network, not a figure to read.
	if v < -200 {
		return "< -200"
	}
	return strconv.FormatFloat(v, 'f', 2, 64)
}

// FormatImpedance prints an impedance as R + jX, or "open" when it is
// infinite.
func FormatImpedance(z complex128) string {
	if cmplx.IsInf(z) || cmplx.IsNaN(z) {
		return "open"
	}
	sign := "+"
	x := imag(z)
	if x < 0 {
		sign = "−"
		x = -x
	}
	return fmt.Sprintf("%s %s j%s", si.Format(real(z), "Ω", 4), sign, si.Format(x, "Ω", 4))
}

// ResponseTable returns the response at up to rows frequencies.
func ResponseTable(r *ac.Response, rows int) *Table {
	two := len(r.Ports) > 1
	name1 := r.Ports[0].Name
	t := &Table{Caption: "Response"}
	t.Header = []string{"frequency"}
	if two {
		t.Header = append(t.Header, fmt.Sprintf("|S21| dB (%s→%s)", name1, r.Ports[1].Name), "∠S21 °")
	}
	t.Header = append(t.Header, fmt.Sprintf("return loss dB (%s)", name1), "VSWR", fmt.Sprintf("input impedance (%s)", name1))
	for _, name := range r.Probes {
		t.Header = append(t.Header, fmt.Sprintf("%s dB", name))
	}
	for _, i := range PickRows(len(r.Points), rows) {
		pt := r.Points[i]
		cells := []string{si.Format(pt.FrequencyHz, "Hz", 4)}
		if two {
			angle := strconv.FormatFloat(Degrees(pt.S[1][0]), 'f', 1, 64)
			if DB(pt.S[1][0]) < -200 {
				angle = "—"
			}
			cells = append(cells, FormatDB(DB(pt.S[1][0])), angle)
		}
		g := cmplx.Abs(pt.S[0][0])
		vswr := "∞"
		if g < 1 {
			vswr = strconv.FormatFloat((1+g)/(1-g), 'f', 2, 64)
		}
		cells = append(cells, FormatDB(-DB(pt.S[0][0])), vswr, FormatImpedance(pt.InputImpedance[0]))
		for _, v := range pt.Probes {
			cells = append(cells, FormatDB(DB(v)))
		}
		t.Add(cells...)
	}
	return t
}
