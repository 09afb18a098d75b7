// Package band solves the sparse linear systems of circuit analysis as
// banded systems: a reverse Cuthill-McKee ordering of the unknowns narrows
// the band, and Gaussian elimination with partial pivoting inside the band
// factors the matrix in O(n·kl·(kl+ku)) work.
//
// A ladder of a thousand diodes has a band a few entries wide and factors in
// linear time; a small dense circuit has a band as wide as the matrix and
// costs what dense LU costs.
//
// Sources: Cuthill and McKee, "Reducing the bandwidth of sparse symmetric
// matrices", Proc. 24th ACM National Conference, 1969, with the reversal of
// George, "Computer implementation of the finite element method", Stanford
// report STAN-CS-71-208, 1971; banded elimination with partial pivoting as
// in Golub and Van Loan, "Matrix Computations", 4th ed., 2013, section 4.3.
package band
