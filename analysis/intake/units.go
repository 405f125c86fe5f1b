package intake

import (
	"fmt"
	"io"
	"strings"
)

// readUnitsRow reads the row under the header as units when --units-row is
// given: one cell per column, trimmed, "" where a cell is empty or a
// missing spelling. The units of the id and group columns are read and
// ignored.
func (r *tableReader) readUnitsRow() error {
	if !r.opt.UnitsRow {
		return nil
	}
	rec, err := r.nextRecord()
	if err == io.EOF {
		return r.fail(r.headerLine, 0, "", "", "--units-row is given but no row follows the header")
	}
	if err != nil {
		return err
	}
	r.units = make([]string, len(rec))
	for j, c := range rec {
		if u := strings.TrimSpace(string(c)); !isMissingToken([]byte(u)) {
			r.units[j] = u
		}
	}
	r.unitsLine = r.rr.position()
	r.dataFrom, r.leadComments = r.unitsLine, r.rr.commentCount()
	return nil
}

// checkUnitsRow compares the first row under the header with what
// --units-row says. A declared units row holding numbers in every
// variable column is data, and reading it as units would lose a sample.
// An undeclared one is recognised by this rule: the first data row is text
// in a variable column while the later sampled rows of that column are
// numbers (at least one, and no text), and either such columns are at least
// two and 80 % of the variable columns whose first cell is not empty, or
// every such text looks like a unit (see looksLikeUnit). The message then
// suggests --units-row, not dropping every column.
func (r *tableReader) checkUnitsRow(probe *rowParser) error {
	scratch := &rowSink{}
	if r.units != nil {
		for _, j := range r.varCols {
			if _, kind := probe.cell([]byte(r.units[j]), scratch); kind != cellNumber {
				return nil
			}
		}
		j := r.varCols[0]
		return r.fail(r.unitsLine, j+1, r.names[j], r.units[j], "--units-row is given, but this row holds numbers in every variable column, so it looks like data; leave out --units-row:")
	}
	if len(r.sample) < 2 {
		return nil
	}
	var found []int
	filled, unitLike := 0, true
	for _, j := range r.varCols {
		_, kind := probe.cell(r.sample[0].cell(j), scratch)
		if kind != cellMissing {
			filled++
		}
		if kind != cellText || !numbersBelow(probe, r.sample[1:], j) {
			continue
		}
		found = append(found, j)
		unitLike = unitLike && looksLikeUnit(r.sample[0].text(j))
	}
	if len(found) == 0 || !(unitLike || len(found) >= 2 && 5*len(found) >= 4*filled) {
		return nil
	}
	j := found[0]
	return r.fail(r.sampleLines[0], j+1, r.names[j], r.sample[0].text(j),
		fmt.Sprintf("this row looks like units under the header, not data (text above numbers in %d of %d variable columns); give --units-row to read it as units; first such cell:", len(found), len(r.varCols)))
}

// numbersBelow reports whether column j of rows holds at least one number
// and no text.
func numbersBelow(probe *rowParser, rows []textRow, j int) bool {
	scratch := &rowSink{}
	numbers := 0
	for _, row := range rows {
		switch _, kind := probe.cell(row.cell(j), scratch); kind {
		case cellText:
			return false
		case cellNumber:
			numbers++
		}
	}
	return numbers > 0
}

// unitSymbols are common unit symbols written without any mark that
// betrays a unit (common practice in laboratory and sensor exports).
var unitSymbols = map[string]bool{
	"ppm": true, "ppb": true, "ppt": true, "pH": true, "K": true, "degC": true, "degF": true,
	"g": true, "kg": true, "mg": true, "ug": true, "ng": true, "pg": true,
	"L": true, "l": true, "mL": true, "ml": true, "uL": true, "ul": true,
	"m": true, "km": true, "cm": true, "mm": true, "um": true, "nm": true, "m2": true, "m3": true, "ha": true,
	"s": true, "ms": true, "min": true, "h": true, "d": true, "Hz": true, "kHz": true,
	"mol": true, "mmol": true, "umol": true, "nmol": true, "M": true, "mM": true, "uM": true, "nM": true,
	"S": true, "mS": true, "uS": true, "V": true, "mV": true, "A": true, "mA": true, "W": true, "kW": true,
	"Pa": true, "kPa": true, "hPa": true, "bar": true, "mbar": true, "atm": true,
	"J": true, "kJ": true, "cal": true, "kcal": true, "Da": true, "kDa": true,
	"U": true, "IU": true, "AU": true, "au": true, "NTU": true, "FNU": true, "cfu": true, "CFU": true,
	"counts": true, "cps": true, "dB": true, "lx": true,
}

// looksLikeUnit reports whether a cell reads as a unit: text in brackets
// or parentheses ("(µS/cm)", "[°C]"), text holding a mark seldom found
// outside units (/ % ‰ ° µ μ · ^ ²  ³), or a common unit symbol.
func looksLikeUnit(s string) bool {
	s = strings.TrimSpace(s)
	if len(s) >= 2 {
		switch open, close := s[0], s[len(s)-1]; {
		case open == '(' && close == ')', open == '[' && close == ']', open == '{' && close == '}':
			return true
		}
	}
	return strings.ContainsAny(s, "/%‰°µμ·^²³") || unitSymbols[s]
}
