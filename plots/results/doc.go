// Package results holds the machine-readable documents of every analysis:
// what `--json` prints and what the CSV files hold, as the contract in the
// circuit-file design fixes them (SI base units, complex numbers as
// [re, im], null for a quantity without a finite value; keys may be added,
// none renamed).
//
// Each document is a type named for its analysis (Bias, Response,
// Distortion, Noise, Study, Yield, Pulse, Mixer, Fit, Harmonics) built from
// the library's results by a function of the same name with Of (BiasOf,
// DistortionOf, ...), and printed by Write. Number and Complex encode a
// non-finite value as null; OrderedNumbers keeps keys in file order.
// A long sweep streams: ResponseWriter writes the response document and
// ResponseCSV its CSV a point at a time, the same bytes as the whole
// document; ResponseStream sends a sweep's points to its CSV, Touchstone
// (WriteTouchstone for a whole response) and JSON outputs as they come.
// WriteNoiseCSV, WriteStudyCSV, WriteYieldCSV and WritePulseCSV write the
// other analyses' rows.
package results
