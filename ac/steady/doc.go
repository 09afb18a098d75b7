// Package steady solves the full nonlinear circuit under a periodic drive
// and reads what the small-signal estimates of package ac are checked
// against.
//
// Solve finds the periodic steady state under one tone by shooting-Newton
// over the trapezoidal rule (Aprille and Trick, Proc. IEEE 60(1), 1972),
// with a Richardson combination of two sample counts, and reads the
// output's harmonics by FFT; with Settings.Method set another method
// solves instead (package ac/balance: harmonic balance for one and two
// tones, and the automatic choice). A State holds the harmonics, THD,
// the DC shift, every diode's extremes against its ratings (Stress,
// typed StressCautions) and, for two tones, the mixing products.
//
// Around it: Compare sets a Volterra estimate beside the waveform, order
// by order; ValidityLimit finds the highest level at which they agree,
// and ValidityNear the same from a guess (a slider's last step), bounded;
// LevelSweep solves a range of levels by continuation, Compression reads
// the 1 dB point, MeasuredIntercept the third-order intercept from a
// two-tone sweep, and DetectorTransfer a detector's transfer curve.
package steady
