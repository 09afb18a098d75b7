// Package explore is the live bias explorer that `qpoint explore` serves:
// one page on the loopback address with a slider and a typed box for
// every value a designer varies — each source and part value, each
// diode-model key, the temperature, the drive's level and frequency —
// and panels that redraw on every move: the Q-point tables, the I–V
// figure of a diode with the load line the rest of the circuit sets
// (smallsignal.LoadLine, plots.OperatingPoint), the transmission and
// return loss over the file's band with the Smith chart (plots.Match,
// plots.Smith), the Volterra estimate with the small-signal validity
// limit, and a detector's sensitivity.
//
// A Session holds the circuit file as read, its Controls, and what the
// last move solved, so that each Move starts from it: the bias point
// (bias.Settings.Start), the validity limit, its waveform and how steeply
// the estimates' error grew there (steady.ValiditySearch). A move that a
// newer move or check makes stale is cancelled at its next waveform
// solve. Every analysis is resolved on the plan (qpoint/ac/plan), as the
// command line and the report resolve theirs; values are applied with
// circuit.WithOverride, so a value out of range gets the loader's words.
// Check solves the full nonlinear circuit on request, reporting its
// progress; CircuitFile writes the values into the file's own text
// (circuit.Rewrite) and ReportCircuit gives the circuit for a report at
// those values.
//
// Handler serves the page (HTML, script and styles embedded from page/)
// and the session's requests at a fixed set of paths. It answers only
// requests naming its own host, takes only JSON posted from its own page
// within MaxBody, and sends a content security policy under which the
// page can reach nothing but its server. It reads and writes no file: the
// command hands it the two writers, to paths fixed before it starts.
// LoopbackAddress checks the address it is to listen on (this computer
// only) and Hosts gives the host names it then answers to; OpenBrowser
// starts the desktop's browser on the page; Serve runs the server until
// its context ends; SavePaths names the files the save buttons write
// unless told otherwise.
package explore
