package plots

import "qpoint/ac"

// ResponseFigures returns every figure of a sweep, in the order a report
// shows them: "gain-phase" (Bode with DefaultTraces), "impedance",
// "smith" and "group-delay". Each Figure's Name is a file-name stem, so a
// caller can write them all into one directory. designHz, when inside the
// sweep, is marked on the Smith chart; zero marks nothing.
func ResponseFigures(r *ac.Response, designHz float64) []*Figure {
	if r == nil {
		r = &ac.Response{}
	}
	return []*Figure{Bode(r), Impedance(r), Smith(r, designHz), GroupDelay(r)}
}
