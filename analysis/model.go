package analysis

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// ModelFormat is the version of model.json this pcqc writes and reads.
// Later versions may add fields; a file of a newer format is refused rather
// than half understood.
const ModelFormat = 1

// Model is what it takes to score new samples against an audited PCA, and
// nothing else: the variables, the preprocessing with its training means and
// scales, the retained loadings, every eigenvalue, the number of training
// samples and the control limits. It is written to model.json by run.
type Model struct {
	Format      int              `json:"format"`
	Tool        ModelTool        `json:"tool"`
	Input       ModelInput       `json:"input"`
	Variables   []string         `json:"variables"`
	Transform   intake.Transform `json:"transform"`
	Scaling     Scaling          `json:"scaling"`
	Means       []float64        `json:"means"`  // of the transformed training values
	Scales      []float64        `json:"scales"` // the divisors used
	SDs         []float64        `json:"sds"`    // training standard deviations of the transformed values
	Retained    int              `json:"retained"`
	Loadings    [][]float64      `json:"loadings"` // p rows of k values
	Eigenvalues []float64        `json:"eigenvalues"`
	Limits      ModelLimits      `json:"limits"`
}

// ModelTool names the software that wrote the model.
type ModelTool struct {
	Name    string `json:"name"`
	Version string `json:"version"`
}

// ModelInput identifies the training data.
type ModelInput struct {
	File     string `json:"file"`
	SHA256   string `json:"sha256"`
	Rows     int    `json:"rows"`
	Encoding string `json:"encoding,omitempty"` // of the training file's text
}

// ModelLimits are the control limits stored with a model: for new samples,
// T² by the F form; Q as for the training samples.
type ModelLimits struct {
	T2_95   float64 `json:"t2_95"`
	T2_99   float64 `json:"t2_99"`
	Q95     float64 `json:"q_95"`
	Q99     float64 `json:"q_99"`
	QMethod QMethod `json:"q_method"`
}

// NewModel extracts the model of an analysis. The version is the writing
// tool's.
func NewModel(r *Result, version string) *Model {
	n := r.Decomp.Rows
	k := r.Retained
	m := &Model{
		Format:      ModelFormat,
		Tool:        ModelTool{Name: "pcqc", Version: version},
		Input:       ModelInput{File: r.Table.File, SHA256: r.Table.SHA256, Rows: n, Encoding: string(r.Table.Encoding)},
		Variables:   r.Table.Variables,
		Transform:   r.Prep.Transform,
		Scaling:     r.Prep.Scaling,
		Means:       r.Prep.Means,
		Scales:      r.Prep.Scales,
		SDs:         r.Prep.SDs,
		Retained:    k,
		Eigenvalues: r.Decomp.Eigenvalues,
	}
	v := r.RetainedLoadings()
	for j := range r.Table.Variables {
		row := make([]float64, k)
		for a := 0; a < k; a++ {
			row[a] = v.At(j, a)
		}
		m.Loadings = append(m.Loadings, row)
	}
	m.Limits = ModelLimits{
		T2_95: T2LimitNew(n, k, Conf95), T2_99: T2LimitNew(n, k, Conf99),
		Q95: r.Samples.Limits.Q95, Q99: r.Samples.Limits.Q99, QMethod: r.Samples.Limits.QMethod,
	}
	return m
}

// Save writes the model as indented JSON.
func (m *Model) Save(path string) error {
	b, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return err
	}
	return os.WriteFile(path, append(b, '\n'), 0o644)
}

// LoadModel reads model.json, which must be a regular file of at most
// ModelFile.Max bytes, and validates it in full before anything uses it. A
// model that is not valid JSON, has fields pcqc does not know, or breaks any
// rule of validate is refused with an InputError whose reason begins
// "damaged model: "; a model of a newer format is refused as such.
func LoadModel(path string) (*Model, error) {
	b, err := intake.ReadRegular(path, intake.ModelFile)
	if err != nil {
		var ie *intake.InputError
		if _, serr := os.Stat(path); errors.Is(serr, fs.ErrNotExist) && errors.As(err, &ie) {
			ie.Reason += " (is this a folder written by pcqc run?)"
		}
		return nil, err
	}
	return decodeModel(path, b)
}

// decodeModel parses and validates the bytes of a model; name is used in
// messages.
func decodeModel(name string, b []byte) (*Model, error) {
	damaged := func(line, col int, reason string) error {
		return &intake.InputError{File: name, Line: line, Column: col, Reason: "damaged model: " + reason}
	}
	var probe struct {
		Format int `json:"format"`
	}
	if err := json.Unmarshal(b, &probe); err != nil {
		return nil, damaged(jsonErrorPosition(b, err))
	}
	if probe.Format > ModelFormat {
		return nil, &intake.InputError{File: name, Reason: fmt.Sprintf("the model is in format %d, newer than the format %d this pcqc reads; apply it with the pcqc version that wrote it or a later one", probe.Format, ModelFormat)}
	}
	if probe.Format < 1 {
		return nil, damaged(0, 0, "no format number (is this a model.json written by pcqc run?)")
	}
	var m Model
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&m); err != nil {
		return nil, damaged(jsonErrorPosition(b, err))
	}
	if err := m.validate(); err != nil {
		return nil, damaged(0, 0, err.Error())
	}
	return &m, nil
}

// jsonErrorPosition turns an error of encoding/json into a line, a column
// and a reason without the package's prefix.
func jsonErrorPosition(b []byte, err error) (line, col int, reason string) {
	var syntax *json.SyntaxError
	var typ *json.UnmarshalTypeError
	switch {
	case errors.As(err, &syntax):
		line, col = offsetPosition(b, syntax.Offset)
		return line, col, "not valid JSON: " + strings.TrimPrefix(syntax.Error(), "json: ")
	case errors.As(err, &typ):
		line, col = offsetPosition(b, typ.Offset)
		field := typ.Field
		if field == "" {
			field = "the model"
		}
		return line, col, fmt.Sprintf("%s holds %s where a %s belongs", field, typ.Value, typ.Type)
	case errors.Is(err, io.ErrUnexpectedEOF), errors.Is(err, io.EOF):
		return 0, 0, "the file ends before the model does (truncated?)"
	}
	reason = strings.TrimPrefix(err.Error(), "json: ")
	// An unknown field has no offset of its own: find its key.
	if quoted, ok := strings.CutPrefix(reason, "unknown field "); ok {
		if key := regexp.MustCompile(regexp.QuoteMeta(quoted) + `\s*:`).FindIndex(b); key != nil {
			line, col = offsetPosition(b, int64(key[0]+1))
		}
	}
	return line, col, reason
}

// offsetPosition returns the 1-based line and column (in bytes) of byte
// offset off of b. The offsets of encoding/json count the bytes read when
// the problem showed: the offending character of a syntax error, the last
// character of a value that does not fit its field.
func offsetPosition(b []byte, off int64) (line, col int) {
	off = min(max(off, 1), int64(len(b)))
	before := b[:off]
	line = bytes.Count(before, []byte{'\n'}) + 1
	col = int(off) - (bytes.LastIndexByte(before, '\n') + 1)
	return line, max(col, 1)
}

// Limits of a plausible model, beyond what its own numbers must agree on.
const (
	// maxModelRows: pcqc holds the training data in memory; 10¹² samples
	// of even 2 variables would be 16 TB.
	maxModelRows = 1_000_000_000_000
	// orthonormalTol bounds max |VᵀV − I| of the stored loadings. VᵀV is
	// of order one whatever the data's units, so the bound is relative to
	// scale; loadings are written with shortest round-trip formatting, so a
	// real model is orthonormal to about 1e-15, and 1e-6 leaves room for
	// any decomposition while refusing loadings that were edited.
	orthonormalTol = 1e-6
	// agreeTol is the relative tolerance for numbers of the model that
	// follow from one another (scales from standard deviations, the sum of
	// the eigenvalues from the variances): they agree to rounding, about
	// 1e-14, in a model pcqc wrote.
	agreeTol = 1e-6
)

// validate checks that the model is one pcqc could have written: every rule
// that Apply and the report rely on, and the agreements between numbers
// that an edit or a damaged file would break. Each group of rules is one
// function; the first broken rule is returned.
func (m *Model) validate() error {
	for _, check := range []func() error{m.checkShape, m.checkPreprocessing, m.checkEigenvalues, m.checkLoadings, m.checkLimits} {
		if err := check(); err != nil {
			return err
		}
	}
	return nil
}

// checkShape: the variables are at least two, named, and unique; every
// per-variable list has one entry per variable and every loadings row one
// value per retained component; 1 ≤ retained ≤ number of eigenvalues ≤
// min(p, n−1); 3 ≤ n ≤ 10¹² and n ≥ retained + 1, which the F form of the
// new-observation T² limit, F(k, n−k), needs.
func (m *Model) checkShape() error {
	p, k, n := len(m.Variables), m.Retained, m.Input.Rows
	if p < 2 {
		return fmt.Errorf("%d variables; a model has at least 2", p)
	}
	seen := make(map[string]int, p)
	for j, v := range m.Variables {
		if strings.TrimSpace(v) == "" {
			return fmt.Errorf("variable %d has no name", j+1)
		}
		if i, dup := seen[v]; dup {
			return fmt.Errorf("variable %s is listed twice (variables %d and %d)", intake.QuoteText(v), i+1, j+1)
		}
		seen[v] = j
	}
	for _, l := range []struct {
		name string
		n    int
	}{{"means", len(m.Means)}, {"scales", len(m.Scales)}, {"sds", len(m.SDs)}, {"loadings", len(m.Loadings)}} {
		if l.n != p {
			return fmt.Errorf("%s has %d values for %d variables", l.name, l.n, p)
		}
	}
	if n < 3 || n > maxModelRows {
		return fmt.Errorf("%d training samples; a model is built from 3 to 10¹²", n)
	}
	most := min(p, n-1)
	if len(m.Eigenvalues) < 1 || len(m.Eigenvalues) > most {
		return fmt.Errorf("%d eigenvalues for %d variables and %d training samples; there are 1 to min(p, n−1) = %d", len(m.Eigenvalues), p, n, most)
	}
	if k < 1 || k > len(m.Eigenvalues) {
		return fmt.Errorf("%d components retained of %d eigenvalues", k, len(m.Eigenvalues))
	}
	for j, row := range m.Loadings {
		if len(row) != k {
			return fmt.Errorf("the loadings of %s have %d values for %d retained components", intake.QuoteText(m.Variables[j]), len(row), k)
		}
	}
	return nil
}

// checkPreprocessing: the training encoding (absent in models written
// before it was recorded), transform and scaling are known; means are finite;
// standard deviations and scales are finite and > 0, and the scales are
// what the scaling makes of the standard deviations (1, sd or √sd; a range
// cannot be checked without the data).
func (m *Model) checkPreprocessing() error {
	if _, ok := intake.ParseEncoding(m.Input.Encoding); !ok && m.Input.Encoding != "" {
		return fmt.Errorf("input encoding %s is not utf-8, latin1 or cp1252", intake.QuoteText(m.Input.Encoding))
	}
	if !slices.Contains(intake.Transforms, m.Transform) {
		return fmt.Errorf("transform %q is not one of %v", m.Transform, intake.Transforms)
	}
	if !slices.Contains(Scalings, m.Scaling) {
		return fmt.Errorf("scaling %q is not one of %v", m.Scaling, Scalings)
	}
	for j, v := range m.Variables {
		mean, scale, sd := m.Means[j], m.Scales[j], m.SDs[j]
		if !isFinite(mean) {
			return fmt.Errorf("the mean of %s is %v", intake.QuoteText(v), mean)
		}
		if !isFinite(sd) || sd <= 0 {
			return fmt.Errorf("the standard deviation of %s is %v; it must be finite and > 0", intake.QuoteText(v), sd)
		}
		if !isFinite(scale) || scale <= 0 {
			return fmt.Errorf("the scale of %s is %v; it must be finite and > 0", intake.QuoteText(v), scale)
		}
		want := math.NaN()
		switch m.Scaling {
		case ScaleNone:
			want = 1
		case ScaleUnit:
			want = sd
		case ScalePareto:
			want = math.Sqrt(sd)
		}
		if !math.IsNaN(want) && math.Abs(scale-want) > agreeTol*want {
			return fmt.Errorf("the scale of %s is %v, but %s makes it %v", intake.QuoteText(v), scale, ScalingName(m.Scaling), want)
		}
	}
	return nil
}

// checkEigenvalues: every eigenvalue is finite, non-negative and no larger
// than the one before (within rounding of the largest); the retained ones
// are > 0, since T² divides by them; and together they are the total
// variance of the preprocessed training data, Σ_j (sd_j/scale_j)².
func (m *Model) checkEigenvalues() error {
	ev := m.Eigenvalues
	for a, l := range ev {
		if !isFinite(l) {
			return fmt.Errorf("eigenvalue %d is %v", a+1, l)
		}
	}
	round := agreeTol * math.Abs(ev[0])
	for a, l := range ev {
		if l < -round {
			return fmt.Errorf("eigenvalue %d is %v; eigenvalues are ≥ 0", a+1, l)
		}
		if a > 0 && l > ev[a-1]+round {
			return fmt.Errorf("eigenvalue %d (%v) is larger than eigenvalue %d (%v); they come in decreasing order", a+1, l, a, ev[a-1])
		}
		if a < m.Retained && !(l > 0) {
			return fmt.Errorf("retained eigenvalue %d is %v; T² divides by it, so it must be > 0", a+1, l)
		}
	}
	total, want := 0.0, 0.0
	for _, l := range ev {
		total += l
	}
	for j := range m.SDs {
		r := m.SDs[j] / m.Scales[j]
		want += r * r
	}
	if isFinite(want) && math.Abs(total-want) > agreeTol*want {
		return fmt.Errorf("the eigenvalues sum to %v, but the variances of the preprocessed variables sum to %v", total, want)
	}
	return nil
}

// checkLoadings: every loading is finite and the loadings are orthonormal,
// max |VᵀV − I| ≤ orthonormalTol.
func (m *Model) checkLoadings() error {
	for j, row := range m.Loadings {
		for a, v := range row {
			if !isFinite(v) {
				return fmt.Errorf("the loading of %s on component %d is %v", intake.QuoteText(m.Variables[j]), a+1, v)
			}
		}
	}
	if e := OrthonormalityError(m.LoadingsMatrix()); !(e <= orthonormalTol) {
		return fmt.Errorf("the loadings are not orthonormal (max |VᵀV − I| = %.3g, beyond %g)", e, orthonormalTol)
	}
	return nil
}

// checkLimits: the T² limits are finite, > 0 and the 99 % one is at least
// the 95 % one. The Q limits follow the eigenvalues left out (QLimit): when
// none of them is > 0 there is no residual space, the method is "none" and
// both limits are 0; otherwise the method is Jackson–Mudholkar or Box and
// the limits are finite, > 0 and ordered.
func (m *Model) checkLimits() error {
	l := m.Limits
	if !isFinite(l.T2_95) || !isFinite(l.T2_99) || l.T2_95 <= 0 || l.T2_99 < l.T2_95 {
		return fmt.Errorf("the T² limits are %v (95 %%) and %v (99 %%); they must be finite, > 0 and in that order", l.T2_95, l.T2_99)
	}
	residual := false
	for _, e := range m.Eigenvalues[m.Retained:] {
		residual = residual || e > 0
	}
	switch l.QMethod {
	case QNone:
		if residual {
			return fmt.Errorf("the Q method is %q, but the eigenvalues left out are not all zero", l.QMethod)
		}
		if l.Q95 != 0 || l.Q99 != 0 {
			return fmt.Errorf("the Q limits are %v and %v with method %q; without residual space they are 0", l.Q95, l.Q99, l.QMethod)
		}
	case QJacksonMudholkar, QBox:
		if !residual {
			return fmt.Errorf("the Q method is %q, but no eigenvalue left out is > 0", l.QMethod)
		}
		if !isFinite(l.Q95) || !isFinite(l.Q99) || l.Q95 <= 0 || l.Q99 < l.Q95 {
			return fmt.Errorf("the Q limits are %v (95 %%) and %v (99 %%); they must be finite, > 0 and in that order", l.Q95, l.Q99)
		}
	default:
		return fmt.Errorf("the Q method %q is not one of %q, %q, %q", l.QMethod, QJacksonMudholkar, QBox, QNone)
	}
	return nil
}

func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// LoadingsMatrix returns the p × k loadings.
func (m *Model) LoadingsMatrix() *mat.Dense {
	v := mat.NewDense(len(m.Variables), m.Retained, nil)
	for j, row := range m.Loadings {
		v.SetRow(j, row)
	}
	return v
}

// Preprocessing returns the model's preprocessing.
func (m *Model) Preprocessing() Preprocessing {
	return Preprocessing{Transform: m.Transform, Scaling: m.Scaling, Means: m.Means, Scales: m.Scales, SDs: m.SDs}
}

// ReadTrainingScores reads the training scores on the first two components
// from an audit folder's scores.csv, which run writes as the id column and
// then PC1, PC2, …; apply draws them behind the new samples. It returns nil
// when the model has one component (that plot has no training background)
// or the file is missing (the folder may have been pruned). Anything else
// that is wrong is an InputError: a path that is not a regular file or is
// larger than TrainingScoresFile.Max, a file that is not such a table, one
// whose rows are not the model's training samples, or a score that the
// model cannot have produced: the scores on component a have sum of
// squares (n−1)λ_a, so no |t_ia| exceeds √((n−1)λ_a) (beyond rounding,
// allowed as 1e-6 of it and of √((n−1)Σλ)).
func ReadTrainingScores(path string, m *Model) (*mat.Dense, error) {
	if m.Retained < 2 {
		return nil, nil
	}
	if _, err := os.Stat(path); errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	r, err := intake.OpenRegular(path, intake.TrainingScoresFile)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	damaged := func(line, col int, name, text, reason string) error {
		return &intake.InputError{File: path, Line: line, Column: col, Name: name, Text: text, Reason: "damaged audit folder: " + reason}
	}
	br := bufio.NewReaderSize(r, 1<<20)
	peek, _ := br.Peek(br.Size())
	if i := bytes.IndexByte(peek, '\n'); i >= 0 {
		peek = peek[:i+1]
	}
	header, err := intake.SplitHeader(peek, ',')
	if err != nil {
		return nil, damaged(1, 0, "", "", "scores.csv has no header of the id and PC1, PC2, …")
	}
	want := []string{"PC1", "PC2"}
	cols := make([]int, len(want))
	for c, name := range want {
		cols[c] = slices.IndexFunc(header, func(h []byte) bool { return strings.TrimSpace(string(h)) == name })
		if cols[c] < 1 {
			return nil, damaged(1, 0, "", "", fmt.Sprintf("scores.csv has no %s column after its id column, though the model retains %d components", name, m.Retained))
		}
	}
	t, err := intake.ReadTableFrom(path, br, intake.ReadOptions{Delimiter: ',', Columns: want, MinRows: 1, KeepConstant: true})
	if err != nil {
		var ie *intake.InputError
		if errors.As(err, &ie) {
			// The reader's advice (flags such as --drop) is for data
			// tables; what remains says what is wrong with the file.
			reason, _, _ := strings.Cut(ie.Reason, "; ")
			reason, _, _ = strings.Cut(reason, " (use ")
			reason = "damaged audit folder: scores.csv is not as run writes it: " + strings.TrimSuffix(reason, ":")
			if ie.Text != "" {
				reason += ":"
			}
			ie.Reason = reason
		}
		return nil, err
	}
	n := m.Input.Rows
	if t.Rows() != n {
		return nil, damaged(0, 0, "", "", fmt.Sprintf("scores.csv has %d samples, but the model was trained on %d (is it from another run?)", t.Rows(), n))
	}
	total := 0.0
	for _, l := range m.Eigenvalues {
		total += l
	}
	slack := 1e-6 * math.Sqrt(float64(n-1)*total)
	for c, name := range want {
		bound := math.Sqrt(float64(n-1)*m.Eigenvalues[c])*(1+1e-6) + slack
		for i := 0; i < n; i++ {
			if v := t.X.At(i, c); !(math.Abs(v) <= bound) {
				return nil, damaged(t.Lines[i], cols[c]+1, name, strconv.FormatFloat(v, 'g', -1, 64),
					fmt.Sprintf("a training score beyond the ±%.4g the model's eigenvalue allows:", bound))
			}
		}
	}
	return t.X, nil
}
