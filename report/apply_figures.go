package report

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"pcqc/analysis"
)

// Figures of an application beyond those it shares with the audit report.

// residualFigure shows one flagged sample's signed residual in each
// variable, e = z − t Vᵀ in preprocessed units: what the sample holds that
// the model's components do not reconstruct. The squares of the bars sum to
// the sample's Q; the sign says whether the sample is above or below the
// model in that variable, which the squared contributions cannot. The
// largest residuals are at the top and at most loadingsShown are drawn.
func residualFigure(app *analysis.Application, c analysis.Contribution) drawing {
	return residualBars(app.Model.Variables, app.Table.IDs[c.Sample], residualUnit(app.Model.Scaling), c.Residual)
}

// residualBars draws one sample's signed residuals, for an application or
// an audit alike; unit labels the axis.
func residualBars(variables []string, id, unit string, residual []float64) drawing {
	values, names, finite, left := residualRows(variables, residual)
	shown := len(values)
	bars := hbars{fill: barColor, values: values}
	title := "Residuals of " + figureText(id, maxLabelRunes)
	if shown < finite {
		title += fmt.Sprintf(" (the %d largest of %d)", shown, finite)
	}
	pl := newPlot(title, unit, "")
	return namedBars(pl, bars, names, left, 2.2, 0.42)
}

// residualRows orders the finite residuals by size, largest first, and
// returns at most loadingsShown of them bottom to top (the plot's row
// order) with their variables' labels, how many were finite, and how many
// were left out for not being finite.
func residualRows(variables []string, residual []float64) (values []float64, names []string, finite, left int) {
	var order []int
	for j := range variables {
		if j < len(residual) && isFinite(residual[j]) {
			order = append(order, j)
		}
	}
	left = len(variables) - len(order)
	slices.SortStableFunc(order, func(a, b int) int {
		ra, rb := math.Abs(residual[a]), math.Abs(residual[b])
		switch {
		case ra > rb:
			return -1
		case ra < rb:
			return 1
		}
		return 0
	})
	shown := min(len(order), loadingsShown)
	values, names = make([]float64, shown), make([]string, shown)
	for r := 0; r < shown; r++ {
		j := order[r]
		row := shown - 1 - r // largest at the top
		values[row] = residual[j]
		names[row] = figureText(variables[j], maxLabelRunes)
	}
	return values, names, len(order), left
}

// residualUnit names the unit of the residuals: the preprocessed scale,
// which for unit scaling is the training standard deviation.
func residualUnit(s analysis.Scaling) string {
	switch s {
	case analysis.ScaleUnit:
		return "signed residual (training standard deviations)"
	case analysis.ScaleNone:
		return "signed residual (units of the data, after any transform)"
	}
	return "signed residual (preprocessed units)"
}

// residualCaption says what a residual figure draws, and which of how many
// flagged samples it is: rank counts from 1, of the shown most extreme of
// flagged samples beyond a 99 % limit.
func residualCaption(id string, rank, shown, flagged int, s analysis.Scaling) string {
	which := fmt.Sprintf("It is the most extreme of the %d samples beyond a 99 %% limit", flagged)
	if rank > 1 {
		which = fmt.Sprintf("It is the %s most extreme of the %d samples beyond a 99 %% limit", ordinal(rank), flagged)
	}
	if flagged == 1 {
		which = "It is the only sample beyond a 99 % limit"
	}
	unit := "preprocessed units"
	if s == analysis.ScaleUnit {
		unit = "training standard deviations"
	}
	drawn := fmt.Sprintf("residuals are drawn for the %d most extreme of them", shown)
	if shown == flagged {
		drawn = fmt.Sprintf("residuals are drawn for all %d", shown)
	}
	if flagged == 1 {
		drawn = ""
	}
	return fmt.Sprintf("Signed residuals of sample %s: in each variable, its value less what the model's components reconstruct, in %s; a bar to the right means the sample is higher than the model expects. The squares of the bars sum to its Q residual. %s.",
		id, unit, strings.TrimSuffix(which+"; "+drawn, "; "))
}

// ordinal writes 2 as "2nd", 3 as "3rd", 11 as "11th".
func ordinal(n int) string {
	suffix := "th"
	if n%100 < 11 || n%100 > 13 {
		switch n % 10 {
		case 1:
			suffix = "st"
		case 2:
			suffix = "nd"
		case 3:
			suffix = "rd"
		}
	}
	return fmt.Sprintf("%d%s", n, suffix)
}
