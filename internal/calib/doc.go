// Package calib is the calibration harness of the audit's judgement: it
// simulates clean tables and tables with one planted defect, runs the full
// default audit on each (analysis.Analyze with the options `pcqc run` uses,
// then checks.RunAll and checks.Verdict), and tallies how often each check
// raises a false alarm on clean data, how often it catches the defect meant
// for it (and names the planted samples), how often the verdict is pass and
// how often the retained count equals the planted one. The targets are
// rates, so no single table can calibrate a check; this package measures
// the rates. It reads check results generically (id → status, message), so
// it keeps working when checks are added, renamed or removed: the mapping
// from defect to the checks expected to catch it is the table Expectations.
//
// # Clean tables
//
// Each clean table is n samples from a population whose CORRELATION matrix
// has a planted spectrum: k signal eigenvalues and p − k equal noise
// eigenvalues σ², summing to p. All variables have unit variance in the
// population, so the default unit scaling is the natural analysis. The
// grid is n ∈ {100, 300, 1000, 5000}, p ∈ {5, 10, 20, 50},
// k ∈ {1, 2, 3, 4} (k < p), Gaussian and heavy-tailed.
//
// The spectrum is chosen so that the planted count is unambiguous at the
// table's n, and the design says why:
//
//   - The smallest signal eigenvalue is twice the upper edge
//     (1 + √(p/n))² of the Marchenko–Pastur law (Marchenko & Pastur 1967)
//     for unit-variance noise. Noise alone does not produce sample
//     eigenvalues beyond that edge, and parallel analysis compares with
//     permuted unit-variance data, whose largest eigenvalue sits near it; a
//     factor of two leaves room for the sampling error of λ_k, about
//     λ_k·√(2/n) (Anderson 1963), which is 14 % at n = 100.
//   - Consecutive signal eigenvalues have the ratio
//     r = max(1.5, 1/(1 − 4√((2 + κ)/n))), so that each gap exceeds four
//     times the sampling error of the larger eigenvalue: North's δλ =
//     λ√(2/n) (North, Bell, Cahalan & Moeng 1982) for Gaussian scores, and
//     λ√((2 + κ)/n) for scores of excess kurtosis κ (λ̂ is a mean of n
//     squared scores, whose variance is λ²(2 + κ)), which widens the gaps of
//     the heavy-tailed variant at small n: the axes are distinct at this n,
//     and an alarm about axis mixing on them is a false one.
//   - The noise eigenvalue σ² = (p − Σ signal)/(p − k) must be at least
//     0.25, so that the variables are not nearly exact combinations of the
//     factors. Cells of the grid where these three demands cannot all be
//     met (large k at small p or small n) are left out, and Grid reports
//     which.
//
// The correlation matrix with that spectrum and a unit diagonal is made
// from Q diag(λ) Qᵀ, Q a random orthogonal matrix (QR of a Gaussian
// matrix), by the Givens rotations of Davies & Higham (2000), BIT
// 40:640–651, which set one diagonal element to 1 at a time and keep the
// eigenvalues. Samples are x = Λ^{1/2}Vᵀz with V the rotated eigenvectors.
//
// The heavy-tailed variant draws the independent scores z from Student's
// t with 10 degrees of freedom rescaled to unit variance (excess kurtosis
// 6/(ν − 4) = 1: mild, the kind of tail real measurements have), with the
// same covariance. It is not the elliptical multivariate t: that shares one
// random scale among all variables, a dependence that correlations miss
// and column permutations destroy, so parallel analysis rightly finds
// structure in its noise (a first run of this harness kept up to 10
// components on 1-component tables with p = 50). Independent heavy-tailed
// scores keep "no structure beyond k" true.
//
// # Defective tables
//
// Each is a clean Gaussian table (k = 2, n ∈ {300, 1000}, p ∈ {10, 20},
// cycled over seeds) with one planted defect; Expectations lists the checks
// that must catch it and what they must name:
//
//  1. off-model: 3 samples displaced off the model plane, each along its
//     own random direction of the noise space, by a squared distance of
//     twice the Bonferroni limit σ²·χ²_{p−k}(1 − 0.05/n) of Q: gross at
//     the family-wise level, yet too small to build a component of its own;
//  2. along-model: 3 samples moved 7 standard deviations along PC1, keeping
//     their own residuals (T² far beyond chance, Q typical);
//  3. no-structure: independent standard normal variables;
//  4. skewed-variable: variable v1 replaced by exp of itself (lognormal,
//     skewness about 6.2), positive;
//  5. mixed-units: v1 multiplied by 1000 and analysed with --scale none;
//  6. equal-eigenvalues: λ1 = λ2 (k = 2), so PC1 and PC2 are not separate
//     axes;
//  7. duplicate-rows: two samples copied over two others;
//  8. lone-component: three extra independent variables, on which one
//     sample has the value 2√n and the rest are standard normal: that
//     sample alone makes a component (its correlation between the three is
//     about 0.8).
//
// # Seeds
//
// Table i of a run with seed S draws from PCG(S, i), and its audit uses the
// seed S ⊕ (i+1)·φ, where φ is the 64-bit golden-ratio constant, so tables
// are independent and the result does not depend on how many workers run
// them.
package calib
