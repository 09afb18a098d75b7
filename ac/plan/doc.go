// Package plan turns what a front end asks for into the settings of each
// analysis: the signal path, the drive, the frequency grids, the noise
// and detector settings and the study. It holds the defaults policy every
// front end shares — a request's own values first, then the circuit
// file's `analysis` block, then qpoint's defaults — so that the command
// line, the report and the browser page resolve a circuit the same way.
//
// Requests are typed values, not command-line text: a front end parses
// its own inputs (and names its own flags in its errors) and hands the
// plan numbers and names. A problem with the request comes back as a
// *RequestError naming the setting at fault, which a front end reports as
// bad input; anything else is an analysis failure.
//
// Front ends share more than the defaults: the texts of ranges, bands,
// lists and levels (ParseRange, ParseLevels, ParseBand, ParseFrequencies,
// ParseTemperatureRange, ParseMixerLevels), the steady-state method
// request (SteadyMethods), a distortion run (RunDistortion), the waveform
// a capture is set beside (PredictHarmonics) and a study's goal
// (Study.Solve).
//
// The path every front end takes:
//
//	path, err := plan.SignalPath(c, "", "")          // the file's input and output, else the first and last ports
//	drive, err := plan.ResolveDrive(c, plan.DriveRequest{})
//	grid, err := plan.ResponseGrid(c, plan.Grid{})
//	st, err := plan.ResolveStudy(c, plan.StudyRequest{...})
package plan
