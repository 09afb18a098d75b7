// Package ac computes the small-signal response of a linearised network
// across frequency: the N-port S-matrix for real reference impedances,
// each port's input impedance with the others terminated, probe transfers
// and the group delay of S21.
//
// At each angular frequency w the network Y(jw) = G + jwC (package
// smallsignal) is factored once by complex LU with partial pivoting and
// solved for every port's excitation. S-parameters use power waves with
// real reference impedances Z0i: with port j driven by a generator of EMF E
// behind Z0j and every port terminated,
//
//	S_ij = 2 (V_i / E) sqrt(Z0j / Z0i) - δ_ij
//
// (Pozar, "Microwave Engineering", 4th ed., 2012, ch. 4). Group delay is
// -d(arg S21)/dw, computed exactly from dx/dw = -Y⁻¹ jC x with the same
// factorisation.
package ac
