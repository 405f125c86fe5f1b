package intake

import (
	"encoding/hex"
	"io"
	"math"
	"os"
)

// StreamRow is one data row handed to a Stream's callback. Values is reused
// from one call to the next: copy what must outlive the call.
type StreamRow struct {
	Values  []float64 // the candidate variables, transformed; NaN where a cell is missing (MissingDrop)
	ID      string
	Group   string
	Line    int
	Missing bool // a cell was missing (MissingDrop: the row is to be left out)
	Imputed int  // cells filled with the column mean (MissingMean)
}

// StreamInfo is what a pass learnt about the file besides its rows.
type StreamInfo struct {
	File, SHA256 string
	Delimiter    byte
	Encoding     Encoding
	IDColumn     string
	GroupColumn  string
	Variables    []string // the candidate variables, in file order
	Columns      []int    // 1-based column of each candidate variable
	Units        []string // unit of each candidate variable (--units-row), or nil
	Drop         []string // columns left out with --drop
	RowsRead     int
	MissingCells int
	MissingIDs   int
}

// Stream reads a table row by row, as often as asked, without holding its
// rows: the reading of a table larger than memory (pcqc run --stream). Each
// pass runs the same steps as ReadTable up to the classification of the
// columns (tableReader), then hands each row to a callback with the same
// validation and the same messages. Only regular files can be streamed,
// since every pass reads the file again.
type Stream struct {
	path string
	opt  ReadOptions
	fill []float64 // MissingMean: the column means of the present cells
	Info StreamInfo
}

// OpenStream checks that path can be streamed with opt and, under
// MissingMean, runs the pass that finds the column means to fill with.
func OpenStream(path string, opt ReadOptions) (*Stream, error) {
	opt = withDefaults(opt)
	if opt.Missing == MissingIterative {
		return nil, &InputError{File: path, Reason: "--missing iterative needs every row in memory; it cannot be combined with --stream (use --missing mean or drop)"}
	}
	if opt.Censored == CensorHalf || opt.Censored == CensorSqrt2 {
		return nil, &InputError{File: path, Reason: "--censored " + string(opt.Censored) + " lists every substituted cell, which --stream does not keep; run without --stream"}
	}
	st, err := os.Stat(path)
	if err != nil {
		return nil, &InputError{File: path, Reason: "cannot open: " + unwrapPathError(err)}
	}
	if !st.Mode().IsRegular() {
		return nil, &InputError{File: path, Reason: "--stream reads the file twice and needs a regular file, not a pipe, device or folder; save the data to a file first"}
	}
	if book, err := isWorkbook(path, opt); err != nil || book {
		if err != nil {
			return nil, err
		}
		return nil, &InputError{File: path, Reason: "--stream reads delimited text (CSV) only; a workbook is read whole: run without --stream, or export the sheet as CSV"}
	}
	s := &Stream{path: path, opt: opt, fill: opt.ImputeWith}
	if opt.Missing == MissingMean && s.fill == nil {
		if err := s.findFill(); err != nil {
			return nil, err
		}
	}
	return s, nil
}

// findFill computes each candidate variable's mean over its present cells.
func (s *Stream) findFill() error {
	var sum []float64
	var cnt []int
	err := s.pass(func(r StreamRow) error {
		if sum == nil {
			sum, cnt = make([]float64, len(r.Values)), make([]int, len(r.Values))
		}
		for k, v := range r.Values {
			if !math.IsNaN(v) {
				sum[k] += v
				cnt[k]++
			}
		}
		return nil
	}, false)
	if err != nil {
		return err
	}
	s.fill = make([]float64, len(sum))
	for k := range sum {
		if cnt[k] == 0 {
			return &InputError{File: s.path, Column: s.Info.Columns[k], Name: s.Info.Variables[k], Reason: "every value of this column is missing; drop it with --drop:"}
		}
		s.fill[k] = sum[k] / float64(cnt[k])
	}
	return nil
}

// Pass reads the file once, from the start, and calls fn with every data
// row in file order; an error from fn ends the pass and is returned.
// s.Info is filled in from the pass.
func (s *Stream) Pass(fn func(StreamRow) error) error { return s.pass(fn, true) }

func (s *Stream) pass(fn func(StreamRow) error, fill bool) error {
	f, err := openData(s.path)
	if err != nil {
		return err
	}
	defer f.Close()
	r := &tableReader{name: s.path, opt: s.opt, idCol: -1, groupCol: -1}
	if err := runSteps(r.headSteps(func() error { return r.open(f) })); err != nil {
		return err
	}
	var fillWith []float64
	if fill {
		fillWith = s.fill
	}
	n, err := r.streamRows(fn, fillWith)
	if err != nil {
		return err
	}
	s.Info = r.streamInfo(n)
	return nil
}

// streamRows parses each row into a one-row sink and hands it on.
func (r *tableReader) streamRows(fn func(StreamRow) error, fill []float64) (int, error) {
	r.rp = r.newRowParser()
	r.sink = newRowSink(len(r.varCols), 1, r.groupCol >= 0)
	n := 0
	one := func(rec [][]byte, line int) error {
		r.sink.rowMissing[0] = false
		if err := r.rp.parse(rec, line, n+1, 0, r.sink); err != nil {
			return err
		}
		n++
		row := StreamRow{Values: r.sink.values, ID: r.sink.ids[0], Line: line, Missing: r.sink.rowMissing[0]}
		if r.sink.groups != nil {
			row.Group = r.sink.groups[0]
		}
		if row.Missing && fill != nil {
			for k, v := range row.Values {
				if math.IsNaN(v) {
					row.Values[k] = fill[k]
					row.Imputed++
				}
			}
			row.Missing = false
		}
		return fn(row)
	}
	if err := r.eachRecord(one); err != nil {
		return 0, err
	}
	if _, err := io.Copy(io.Discard, r.src.br); err != nil {
		return 0, r.fail(0, 0, "", "", "read error: "+err.Error())
	}
	return n, nil
}

// streamInfo gathers what the pass learnt.
func (r *tableReader) streamInfo(rows int) StreamInfo {
	in := StreamInfo{File: r.name, SHA256: hex.EncodeToString(r.hasher.Sum(nil)), Delimiter: r.delim,
		Encoding: r.opt.Encoding, RowsRead: rows, MissingCells: r.sink.nMissing, MissingIDs: r.sink.missingIDs}
	if r.idCol >= 0 {
		in.IDColumn = r.names[r.idCol]
	}
	if r.groupCol >= 0 {
		in.GroupColumn = r.names[r.groupCol]
	}
	for _, j := range r.varCols {
		in.Variables = append(in.Variables, r.names[j])
		in.Columns = append(in.Columns, j+1)
		if r.units != nil {
			in.Units = append(in.Units, r.units[j])
		}
	}
	for j, d := range r.dropped {
		if d {
			in.Drop = append(in.Drop, r.names[j])
		}
	}
	return in
}

// IsConstantRange reports whether a column spanning [lo, hi] is constant
// in the sense ReadTable drops constant columns.
func IsConstantRange(lo, hi float64) bool { return isConstant(lo, hi) }

// Path returns the streamed file's name as given.
func (s *Stream) Path() string { return s.path }
