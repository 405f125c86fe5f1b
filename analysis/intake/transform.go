package intake

import "math"

// Transform is an element-wise transform applied to every variable cell
// before centring and scaling.
type Transform string

const (
	TransformNone  Transform = "none"
	TransformLog   Transform = "log"   // natural logarithm; values must be > 0
	TransformLog10 Transform = "log10" // base-10 logarithm; values must be > 0
	TransformLog1p Transform = "log1p" // log(1 + x); values must be > −1
)

// Transforms lists the accepted transforms, for flag validation and help.
var Transforms = []Transform{TransformNone, TransformLog, TransformLog10, TransformLog1p}

func (t Transform) apply(v float64) (float64, bool) {
	switch t {
	case TransformLog:
		if v <= 0 {
			return 0, false
		}
		return math.Log(v), true
	case TransformLog10:
		if v <= 0 {
			return 0, false
		}
		return math.Log10(v), true
	case TransformLog1p:
		if v <= -1 {
			return 0, false
		}
		return math.Log1p(v), true
	}
	return v, true
}

// Apply transforms one raw value; ok is false outside the transform's domain.
func (t Transform) Apply(v float64) (float64, bool) { return t.apply(v) }

func (t Transform) domain() string {
	switch t {
	case TransformLog, TransformLog10:
		return "values must be greater than 0"
	case TransformLog1p:
		return "values must be greater than −1"
	}
	return "any finite value"
}
