package analysis

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"

	"gonum.org/v1/gonum/mat"
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
	Format      int         `json:"format"`
	Tool        ModelTool   `json:"tool"`
	Input       ModelInput  `json:"input"`
	Variables   []string    `json:"variables"`
	Transform   Transform   `json:"transform"`
	Scaling     Scaling     `json:"scaling"`
	Means       []float64   `json:"means"`  // of the transformed training values
	Scales      []float64   `json:"scales"` // the divisors used
	SDs         []float64   `json:"sds"`    // training standard deviations of the transformed values
	Retained    int         `json:"retained"`
	Loadings    [][]float64 `json:"loadings"` // p rows of k values
	Eigenvalues []float64   `json:"eigenvalues"`
	Limits      ModelLimits `json:"limits"`
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

// LoadModel reads and validates model.json.
func LoadModel(path string) (*Model, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, &InputError{File: path, Reason: "cannot read the model: " + unwrapPathError(err) + " (is this a folder written by pcqc run?)"}
	}
	var probe struct {
		Format int `json:"format"`
	}
	if err := json.Unmarshal(b, &probe); err != nil {
		return nil, &InputError{File: path, Reason: "not a pcqc model: " + err.Error()}
	}
	if probe.Format > ModelFormat {
		return nil, &InputError{File: path, Reason: fmt.Sprintf("the model is in format %d, newer than the format %d this pcqc reads; apply it with the pcqc version that wrote it or a later one", probe.Format, ModelFormat)}
	}
	if probe.Format < 1 {
		return nil, &InputError{File: path, Reason: "not a pcqc model (no format number)"}
	}
	var m Model
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&m); err != nil {
		return nil, &InputError{File: path, Reason: "the model is damaged: " + err.Error()}
	}
	if err := m.validate(); err != nil {
		return nil, &InputError{File: path, Reason: "the model is damaged: " + err.Error()}
	}
	return &m, nil
}

func (m *Model) validate() error {
	p, k := len(m.Variables), m.Retained
	switch {
	case p < 2:
		return fmt.Errorf("%d variables", p)
	case len(m.Means) != p || len(m.Scales) != p || len(m.SDs) != p || len(m.Loadings) != p:
		return fmt.Errorf("means, scales, sds and loadings must have one entry per variable (%d)", p)
	case k < 1 || k > len(m.Eigenvalues):
		return fmt.Errorf("%d retained components of %d", k, len(m.Eigenvalues))
	case m.Input.Rows < 3:
		return fmt.Errorf("%d training samples", m.Input.Rows)
	}
	for j, row := range m.Loadings {
		if len(row) != k {
			return fmt.Errorf("loadings of %s have %d values, not %d", m.Variables[j], len(row), k)
		}
	}
	for j, s := range m.Scales {
		if !(s > 0) || math.IsInf(s, 0) {
			return fmt.Errorf("scale of %s is %v", m.Variables[j], s)
		}
	}
	for a := 0; a < k; a++ {
		if !(m.Eigenvalues[a] > 0) {
			return fmt.Errorf("eigenvalue %d is %v", a+1, m.Eigenvalues[a])
		}
	}
	return nil
}

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
