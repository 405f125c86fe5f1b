package checks

import (
	"fmt"
	"strings"

	"pcqc/analysis"
)

// axisMixing gathers the evidence that retained components are not separate
// axes: pairs of retained neighbours whose equality Anderson's test does not
// reject at SeparationAlpha, and components whose sign-aligned bootstrap
// congruence is low while the Procrustes-aligned one is high (the axes
// rotate within a stable subspace: sign-aligned φ₅ below AxisMixingLimit).
// Both are one finding with one cause, nearly equal eigenvalues, and
// eigenvalue-separation alone raises it, on the test (which has a stated
// level); the rotation corroborates it and loading-stability refers to it.
type axisMixing struct {
	equalPairs []analysis.Separation // both retained, equality not rejected
	rotating   []int                 // 0-based retained components
}

func findAxisMixing(res *analysis.Result) axisMixing {
	var m axisMixing
	for _, s := range res.Separation {
		if s.BothRetained && s.AndersonP >= SeparationAlpha {
			m.equalPairs = append(m.equalPairs, s)
		}
	}
	st := res.Stability
	if st.Used > 0 && res.Retained > 1 {
		for a, c := range st.Components {
			if c.CongruenceP5 < AxisMixingLimit && c.ProcrustesP5 >= CongruencePass {
				m.rotating = append(m.rotating, a)
			}
		}
	}
	return m
}

// any reports whether the eigenvalue evidence calls retained axes equal.
func (m axisMixing) any() bool { return len(m.equalPairs) > 0 }

func pcList(idx []int) string {
	names := make([]string, len(idx))
	for i, a := range idx {
		names[i] = fmt.Sprintf("PC%d", a+1)
	}
	return strings.Join(names, ", ")
}
