package checks

// Every threshold the checks use, each beside its source.

// Correctness of the decomposition. These are facts of the trade: in exact
// arithmetic the preprocessed data have zero column means, loadings are
// orthonormal, scores are uncorrelated and each eigenvalue equals the variance
// of its scores. The limits allow for rounding in double precision
// (ε ≈ 2.2e-16) with a wide margin, following the common practice of
// accepting errors up to about √ε·scale, so that any failure means a real
// error in the method rather than rounding.
const (
	// CenteringLimit bounds max |column mean| / largest column scale.
	CenteringLimit = 1e-8
	// OrthonormalityLimit bounds max |VᵀV − I| (loadings are unit-free).
	OrthonormalityLimit = 1e-8
	// ScoreCorrelationLimit bounds the largest off-diagonal |correlation|
	// between retained score columns.
	ScoreCorrelationLimit = 1e-6
	// VarianceMatchLimit bounds max |var(t_a) − λ_a| / λ_a.
	VarianceMatchLimit = 1e-6
)

const sourceFactOfTrade = "fact of the trade (exact in theory); rounding allowance: common practice"
