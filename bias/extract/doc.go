// Package extract finds a diode model's values from measured points: the
// forward and reverse current against voltage (I–V), at one temperature
// or several, and the junction capacitance against voltage (C–V). Every
// law it fits is the one the circuit file uses, evaluated by bias/diode,
// so a fitted model reproduces its measurements in every analysis.
//
// Forward current. The current of a junction behind its series
// resistance R_S is, exactly (Banwell and Jayakumar, "Exact analytical
// solution for current flow through diode with series resistance",
// Electronics Letters 36(4), 2000; diode.Device.TerminalCurrent),
//
//	I(V) = (n V_T / R_S) W((I_S R_S / (n V_T)) exp((V + I_S R_S) / (n V_T))) - I_S,
//
// with I_S(T) = I_S(T0) (T/T0)^(p/n) exp((q E_g / (n k)) (1/T0 - 1/T)) at
// each point's temperature (diode.New). The values θ = (ln I_S, n, R_S,
// and with several temperatures E_g and p) minimise the weighted sum
//
//	S(θ) = Σ_k w_k² (ln I(V_k; θ) - ln I_k)²,   w_k = 1 / sqrt(1 + (I_floor / I_k)²),
//
// so that each point counts by its relative error, as a current meter's
// error is relative over many decades (I_floor, zero by default, is an
// absolute resolution that lowers the weight of the smallest currents).
// Levenberg–Marquardt steps (Marquardt, J. SIAM 11(2), 1963) take the
// analytic Jacobian of ln I, found by implicit differentiation of
// i = i_j(V - i R_S). The start comes from the low-current points, where
// R_S drops little: for each ideality n, ln I_S is the median of
// ln I_k - ln(exp(V_k/(n V_T)) - 1), and n is the value that makes the
// absolute deviations least; this is the slope of ln I against V made
// robust to outliers and to the -1 of the law near zero bias. R_S starts
// from the excess voltage of the highest currents. The extraction methods
// compared are those reviewed by Ortiz-Conde, García Sánchez and Muci,
// Solid-State Electronics 44, 2000.
//
// Uncertainty. At the optimum, with J the Jacobian of the weighted
// residuals and s² = S/(N - P) the residual variance, the covariance is
// s² (JᵀJ)⁻¹ (Gauss–Newton, as JCGM 100:2008 (GUM) sec. 5.1.2 propagates
// it); standard errors are the roots of its diagonal and correlations
// its normalised entries. I_S is fitted as ln I_S, so its standard error
// is I_S σ(ln I_S). A value whose standard error is more than half its
// size, or that ends at the edge of its range, is not determined by the
// data: it is put back to its default, the fit is repeated without it,
// and a NotDetermined caution says so. I_S and n are always fitted.
//
// Reverse current. Where reverse points rise well above the leakage at
// low reverse bias, the breakdown knee
// i_b(v) = -I_BV (exp(-(v + V_BV)/(n V_T)) - exp(-V_BV/(n V_T)))
// is fitted to them. Its slope is fixed at n V_T per e-fold, so V_BV and
// I_BV are not separately determined: I_BV is set to a round current
// inside the measured breakdown range and V_BV is fitted to the points
// (least squares on ln |I|, the forward values held).
//
// Capacitance. C(V) = dq_j/dv at the junction voltage, the depletion law
// C_j0 / (1 - v/V_bi)^m with its continuation above V_bi/2
// (diode.Device.DepletionCharge), is fitted on ln C by a quasi-Newton
// method (gonum/optimize BFGS) over ln C_j0, ln V_bi and the logit of m,
// so that each stays in its range; the covariance is then taken in
// C_j0, V_bi, m as above, from a central-difference Jacobian
// (gonum/diff/fd).
//
// Several temperatures. With I–V points at two temperatures E_g is fitted
// with p held at its default (the two are not separable from two
// temperatures); with three or more both are, and their correlation is
// reported, usually close to one.
package extract
