package report

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"pcqc/analysis"
)

// StreamSamples writes samples.csv of a streamed audit one sample at a
// time, as the second pass hands them on: id, T², Q, leverage, the limits
// passed, then the scores. Nothing is held beyond the write buffer.
type StreamSamples struct {
	f   *os.File
	bw  *bufio.Writer
	w   *csv.Writer
	row []string
}

// NewStreamSamples creates dir/samples.csv with the header for k scores.
func NewStreamSamples(dir, idHeader string, k int) (*StreamSamples, error) {
	f, err := os.Create(filepath.Join(dir, "samples.csv"))
	if err != nil {
		return nil, err
	}
	s := &StreamSamples{f: f, bw: bufio.NewWriterSize(f, 1<<20)}
	s.w = csv.NewWriter(s.bw)
	header := []string{idHeader, "t2", "q", "leverage", "beyond"}
	for a := 0; a < k; a++ {
		header = append(header, "score_"+componentName(a))
	}
	return s, s.w.Write(header)
}

// Write adds one sample.
func (s *StreamSamples) Write(x analysis.StreamSample) error {
	s.row = append(s.row[:0], x.ID, num(x.T2), num(x.Q), num(x.Lev), strings.Join(x.Beyond, " "))
	for _, t := range x.Scores {
		s.row = append(s.row, num(t))
	}
	return s.w.Write(s.row)
}

// Close flushes and closes the file.
func (s *StreamSamples) Close() error {
	s.w.Flush()
	if err := s.w.Error(); err != nil {
		s.f.Close()
		return err
	}
	if err := s.bw.Flush(); err != nil {
		s.f.Close()
		return err
	}
	return s.f.Close()
}

// WriteStream writes the tables, summary.json and the report of a streamed
// audit into dir, in the formats asked for: the same Markdown source
// rendered to PDF and HTML as the in-memory report is.
func WriteStream(dir string, res *analysis.StreamResult, meta Meta, ropt ReportOptions, formats Formats) error {
	if err := writeCSV(filepath.Join(dir, "variance.csv"), streamVarianceRows(res)); err != nil {
		return err
	}
	if err := writeCSV(filepath.Join(dir, "loadings.csv"), streamLoadingRows(res)); err != nil {
		return err
	}
	if err := writeCSV(filepath.Join(dir, "flagged.csv"), streamFlaggedRows(res)); err != nil {
		return err
	}
	sum, err := json.MarshalIndent(streamSummary(res, meta), "", "  ")
	if err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(dir, "summary.json"), append(sum, '\n'), 0o644); err != nil {
		return err
	}
	if !formats.Any() {
		return nil
	}
	caption, drawn, err := streamScoreFigure(res, dir)
	if err != nil {
		return err
	}
	text := streamMarkdown(res, meta, ropt)
	if drawn {
		fig := fmt.Sprintf("\n![%s](figures/stream-scores.png)\n\n*%s*\n", caption, caption)
		text = strings.Replace(text, "\n## Cautions", fig+"\n## Cautions", 1)
	}
	text += "\n## References\n\n"
	for _, r := range referencesIn(text) {
		text += "- " + r.Citation + "\n"
	}
	title := ropt.Title
	if title == "" {
		title = streamTitle(res)
	}
	page := Page{Title: title, Author: ropt.Author, Date: ropt.Date, Version: meta.Version, File: res.Info.File, SHA256: res.Info.SHA256}
	return writeRenderings(dir, []byte(text), nil, page, formats)
}

// streamTitle is the default title of a streamed audit's report.
func streamTitle(res *analysis.StreamResult) string { return "PCA audit of " + res.Info.File }

func streamVarianceRows(res *analysis.StreamResult) [][]string {
	rows := [][]string{{"component", "eigenvalue", "percent", "eigenvalue_low95", "eigenvalue_high95", "retained"}}
	pct := analysis.PercentOfTotal(res.Decomp.Eigenvalues)
	for a, e := range res.Decomp.Eigenvalues {
		lo, hi := "", ""
		if a < len(res.Stability.Eigenvalues) {
			lo, hi = num(res.Stability.Eigenvalues[a].Low), num(res.Stability.Eigenvalues[a].High)
		}
		rows = append(rows, []string{componentName(a), num(e), num(pct[a]), lo, hi, fmt.Sprint(a < res.Retained)})
	}
	return rows
}

func streamLoadingRows(res *analysis.StreamResult) [][]string {
	k := res.Retained
	header := []string{"variable"}
	for a := 0; a < k; a++ {
		header = append(header, componentName(a))
		if res.Stability.Used > 0 {
			header = append(header, componentName(a)+"_low95", componentName(a)+"_high95")
		}
	}
	rows := [][]string{header}
	for j, name := range res.Variables {
		row := []string{name}
		for a := 0; a < k; a++ {
			row = append(row, num(res.Decomp.Loadings.At(j, a)))
			if res.Stability.Used > 0 {
				li := res.Stability.Loadings[j][a]
				row = append(row, num(li.Low), num(li.High))
			}
		}
		rows = append(rows, row)
	}
	return rows
}

func streamFlaggedRows(res *analysis.StreamResult) [][]string {
	header := []string{"id", "line", "t2", "q", "beyond"}
	for _, v := range res.Variables {
		header = append(header, "qcontrib_"+v)
	}
	rows := [][]string{header}
	for _, s := range res.Flagged {
		row := []string{s.ID, fmt.Sprint(s.Line), num(s.T2), num(s.Q), strings.Join(s.Beyond, " ")}
		for _, c := range s.Contributed {
			row = append(row, num(c))
		}
		rows = append(rows, row)
	}
	return rows
}
