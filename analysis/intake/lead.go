package intake

import (
	"fmt"
	"io"
)

// lead says which lines before the header are not read: the first skip
// lines of the file (a title, an instrument's preamble), and after them any
// line starting with comment (0: none) or blank.
type lead struct {
	skip    int
	comment byte
}

// passLead consumes the lines lead names, before the delimiter is detected
// from the header line, so that a title holding commas or quotes cannot
// mislead it. The lines passed over still count, so every message gives the
// file's own line numbers.
func (s *textSource) passLead(name string) error {
	rr := &recordReader{br: s.br, cr: s.cr, enc: s.enc, line: s.skip}
	for i := 0; i < s.lead.skip; i++ {
		// Skipped lines may hold anything: a bad byte there is not an error.
		if _, err := rr.readLine(); err != nil && err != errBadText {
			if err == io.EOF {
				return &InputError{File: name, Line: rr.line, Reason: fmt.Sprintf("--skip %d passes the end of the file, which has %d lines", s.lead.skip, rr.line)}
			}
			return readError(name, rr, err)
		}
	}
	for s.lead.comment != 0 {
		next, _ := s.br.Peek(1)
		if len(next) == 0 || (next[0] != s.lead.comment && next[0] != '\n' && next[0] != '\r') {
			break
		}
		isComment := next[0] == s.lead.comment
		if _, err := rr.readLine(); err != nil && err != errBadText {
			return readError(name, rr, err)
		}
		if isComment {
			s.comments++
		}
	}
	s.skip = rr.line
	return nil
}
