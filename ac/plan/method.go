package plan

import (
	"strings"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/ac/steady"
	"qpoint/smallsignal"
)

// MethodRequest asks how the steady state is solved: Method is auto, hb
// (harmonic balance) or shooting; Truncation the two-tone products
// harmonic balance keeps, diamond or box; Order the truncation's starting
// order.
type MethodRequest struct {
	Method, Truncation string
	Order              int
}

// SteadyMethods resolves a method request into the methods steady.Solve
// runs, checking it against the network and drive: search for the
// validity limit and the one-tone level sweep, wave for the waveforms
// reported beside the estimate. They differ only under auto with a second
// tone: the two-tone waveform needs harmonic balance, and the one-tone
// waveform beside it is solved the same way so that the waveform reported
// has one method. Its errors are RequestErrors naming the setting (method,
// truncation, truncation-order or second-tone).
func SteadyMethods(nw *smallsignal.Network, drive ac.Drive, req MethodRequest) (search, wave steady.Method, err error) {
	choice, err := balance.ParseChoice(req.Method)
	if err != nil {
		return nil, nil, &RequestError{Settings: []string{"method"}, Err: err}
	}
	var tr balance.Truncation
	switch req.Truncation {
	case "diamond":
		tr = balance.Diamond
	case "box":
		tr = balance.Box
	default:
		return nil, nil, requestErr("truncation", "%q; accepted: diamond, box", req.Truncation)
	}
	if req.Order < 2 || req.Order > 60 {
		return nil, nil, requestErr("truncation-order", "%d; accepted: 2 to 60 (3 or more for the diamond)", req.Order)
	}
	if choice == balance.Shooting && nw.HasElements() {
		return nil, nil, requestErr("method", "shooting solves the circuit in time and cannot carry %s, known by S-matrices in frequency; accepted: hb or auto (harmonic balance takes them)", strings.Join(nw.ElementNames(), ", "))
	}
	m := balance.Method{Choice: choice, Settings: balance.Settings{Truncation: tr, Order: req.Order}}
	w := m
	if drive.SecondToneHz != 0 {
		if choice == balance.Shooting {
			return nil, nil, requestErr("method", "shooting solves one tone; with --second-tone use auto or hb")
		}
		if choice == balance.Auto {
			w.Choice, w.Reason = balance.HarmonicBalance, "harmonic balance, for two tones"
		}
		if err := balance.Check(nw, drive, m.Settings); err != nil {
			return nil, nil, &RequestError{Settings: []string{"second-tone"}, Err: err}
		}
	}
	return m, w, nil
}
