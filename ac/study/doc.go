// Package study varies one or two quantities of a circuit — a part value,
// a diode-model parameter or the temperature, and optionally frequency as
// a second axis — and reports at each step the diodes' Q points, the
// small-signal response at chosen frequencies, distortion estimates and,
// for detectors, the sensitivity figures of Cowley and Sorensen,
// "Quantitative comparison of solid-state microwave detectors", IEEE Trans.
// MTT 14(12), 1966.
//
// Steps run in parallel. Each worker takes whole chains of consecutive
// steps and solves each step's bias from the previous step's solution
// (continuation); the chains are the same whatever the worker count, so
// the results are identical, bit for bit, with one worker or many.
//
// Targets find the value that meets a condition by bracketing a sign
// change on the step grid and refining it with Brent's method (Brent,
// "Algorithms for Minimization without Derivatives", 1973, ch. 4);
// maximisation and minimisation refine the best grid step with golden-
// section search on its neighbours (ch. 5). gonum has neither a bracketing
// root finder nor a one-dimensional bounded minimiser (its optimize package
// works on unbounded multivariate problems), so both are written here.
package study
