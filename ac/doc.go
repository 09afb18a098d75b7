// Package ac computes what a circuit does to signals at its bias point:
// the small-signal response across frequency, distortion, the periodic
// steady state under a large signal, and noise.
//
// Response. At each angular frequency w the network Y(jw) = G + jwC
// (package smallsignal) is solved for every port's excitation. A sweep of
// few points, or of a small network, factors Y(jw) by dense complex LU at
// each point; a long sweep of a larger network first reduces (G, C) once,
// L (G + sC) R = H + sT with H, T real, and then costs O(n²) per point
// (Laub, "Efficient multivariable frequency response computations", IEEE
// Trans. Automatic Control 26(2), 1981): through a real shift σ, to the
// Schur or Hessenberg form of (G + σC)⁻¹C (gonum's Dhseqr, Dgehrd), or to
// Hessenberg-triangular form (QR of C, then Dgghrd). A reduced form is used
// only where a check at one frequency per decade (at least three) shows it
// agrees with iterative refinement to 1e-10. S-parameters use power waves
// with real reference impedances Z0i: with port j driven by a generator of
// EMF E behind Z0j and every port terminated,
//
//	S_ij = 2 (V_i / E) sqrt(Z0j / Z0i) - δ_ij
//
// (Pozar, "Microwave Engineering", 4th ed., 2012, ch. 4). Group delay is
// -d(arg S21)/dw, computed exactly from dx/dw = -Y⁻¹ jC x.
//
// Distortion. Volterra estimates to third order by the method of nonlinear
// currents, for one and two tones, with each diode's and each
// nonlinearity's share found by an adjoint solve (Volterra,
// VolterraSweep). The full nonlinear circuit's periodic steady state, the
// waveform the estimates are checked against, is package ac/steady.
//
// Noise. Every resistor's thermal noise, each junction's shot and flicker
// noise and each port termination's noise, carried to the output by one
// adjoint solve per frequency (Noise, IntegrateNoise, Detector).
//
// Touchstone files are their own package, ac/touchstone; the periodic
// steady state, level sweeps and the validity limit are ac/steady.
package ac
