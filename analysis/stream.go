package analysis

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// StreamOptions are the choices of a streamed audit (pcqc run --stream).
type StreamOptions struct {
	Scaling      Scaling
	Components   ComponentRule
	Permutations int    // parallel analysis on the reservoir; 0 turns it off
	Bootstrap    int    // Poisson-bootstrap resamples; 0 turns it off
	Reservoir    int    // rows sampled for parallel analysis and figures; 0 means DefaultReservoir
	Seed         uint64 // for every random stream
	Threads      int
}

// DefaultReservoir is the reservoir size: parallel analysis on 10,000 rows
// takes a few seconds and settles every component whose eigenvalue stands
// clearly above noise; the score plots draw at most about 5,000 points.
const DefaultReservoir = 10000

// MaxStreamVariables bounds p in stream mode: the sums hold p(p+1)/2
// numbers and the reservoir DefaultReservoir·p, 16 MB and 160 MB at p =
// 2,000, and the p×p eigen-decomposition takes a few seconds there. Wider
// tables are audited in memory, where the n×n route serves them.
const MaxStreamVariables = 2000

// MaxBootstrapSums bounds B·p(p+1)/2, the numbers the Poisson bootstrap
// keeps (8 bytes each): 32 million is 256 MB, e.g. B = 500 with p ≤ 357.
const MaxBootstrapSums = 32 << 20

// StreamSample is one sample's diagnostics from the second pass.
type StreamSample struct {
	ID, Group   string
	Line        int
	Scores      []float64 // reused between calls
	T2, Q, Lev  float64
	Beyond      []string
	Contributed []float64 // Q contributions per variable, reused between calls
}

// StreamResult is a streamed audit: the decomposition from the first pass's
// sums, the component count, the control limits, and what the second pass
// found. It holds no n × p matrix.
type StreamResult struct {
	Info             intake.StreamInfo
	Options          StreamOptions
	Variables        []string
	Units            []string // unit of each variable analysed (--units-row), or nil
	Columns          []int
	DroppedVariables []intake.DroppedVariable
	Rows             int // used in the fit
	RowsDropped      int
	DroppedRows      []intake.DroppedRow // the first MaxListedRows
	ImputedCells     int
	Prep             Preprocessing
	Decomp           *Decomposition
	Counts           ComponentCounts
	Retained         int
	NoStructure      bool
	Limits           Limits // normal theory (TrainingLimits); no tail adaptation
	// Sample is the reservoir's rows preprocessed (rows × kept variables),
	// with their ids, groups and lines: parallel analysis ran on it.
	Sample        *mat.Dense
	SampleIDs     []string
	SampleGroups  []string
	SampleLines   []int
	Subsampled    bool // the reservoir holds fewer rows than were used
	Flagged       []StreamSample
	FlaggedCount  int
	Dominance     []float64
	DominanceID   []string
	Stability     Stability
	BootstrapNote string // why the bootstrap did not run, if it did not
}

// StreamAnalyze audits the table at path in two passes over the file: the
// first accumulates the sums (and the reservoir and bootstrap sums), the
// second computes each sample's scores, T², Q and limits and hands them to
// each (for the samples table), in file order. ready, when not nil, is
// called between the passes, once the decomposition is known.
func StreamAnalyze(path string, read intake.ReadOptions, opt StreamOptions, each func(StreamSample) error, ready func(*StreamResult) error) (*StreamResult, error) {
	if opt.Scaling == "" {
		opt.Scaling = ScaleUnit
	}
	if opt.Components.Kind == "" {
		opt.Components = DefaultComponentRule
	}
	if opt.Reservoir <= 0 {
		opt.Reservoir = DefaultReservoir
	}
	st, err := intake.OpenStream(path, read)
	if err != nil {
		return nil, err
	}
	r := &StreamResult{Options: opt}
	fp, err := r.firstPass(st)
	if err != nil {
		return nil, err
	}
	keep, err := r.keepVariables(fp, read)
	if err != nil {
		return nil, err
	}
	if err := r.fit(fp.sums.Select(keep), read.Transform); err != nil {
		return nil, err
	}
	r.sampleReservoir(fp.reservoir, keep)
	if err := r.countComponents(); err != nil {
		return nil, err
	}
	r.Limits = TrainingLimits(r.Rows, r.Retained, r.Decomp.Eigenvalues)
	r.summariseBootstrap(fp.boot, keep)
	if ready != nil {
		if err := ready(r); err != nil {
			return nil, err
		}
	}
	if err := r.secondPass(st, keep, each); err != nil {
		return nil, err
	}
	return r, nil
}

// firstPass reads the file once into sums.
func (r *StreamResult) firstPass(st *intake.Stream) (*firstPass, error) {
	fp := &firstPass{reservoir: newReservoir(r.Options.Reservoir, r.Options.Seed)}
	if b := r.Options.Bootstrap; b > 0 {
		fp.boot = make([]*Sums, b)
		fp.poisson = newPoissonOne(taskRNG(r.Options.Seed, streamPoisson, 0))
	}
	wide := false
	err := st.Pass(func(row intake.StreamRow) error {
		if fp.sums == nil && len(row.Values) > MaxStreamVariables {
			return &intake.InputError{File: st.Path(), Line: row.Line, Reason: fmt.Sprintf("--stream is for tall tables of at most %d variables (this one has %d); audit it in memory, or choose columns with --columns", MaxStreamVariables, len(row.Values))}
		}
		if fp.sums == nil && len(fp.boot)*len(row.Values)*(len(row.Values)+1)/2 > MaxBootstrapSums {
			fp.boot, wide = nil, true
		}
		fp.add(row)
		return nil
	})
	if err != nil {
		return nil, err
	}
	if wide {
		r.BootstrapNote = fmt.Sprintf("not run: %d resamples of %d variables would keep more than %d sums", r.Options.Bootstrap, len(st.Info.Variables), MaxBootstrapSums)
	}
	r.Info = st.Info
	r.RowsDropped, r.DroppedRows, r.ImputedCells = fp.nDropped, fp.dropped, fp.imputed
	for i, gap := range fp.gaps {
		for _, k := range gap {
			r.DroppedRows[i].Missing = append(r.DroppedRows[i].Missing, st.Info.Variables[k])
		}
	}
	return fp, nil
}

// keepVariables leaves out constant columns, as ReadTable does, and
// refuses a table with too few rows or variables.
func (r *StreamResult) keepVariables(fp *firstPass, read intake.ReadOptions) ([]int, error) {
	in := r.Info
	n := 0
	if fp.sums != nil {
		n = int(fp.sums.N)
	}
	if n < 3 {
		reason := fmt.Sprintf("fewer than 3 usable rows (%d read", in.RowsRead)
		if r.RowsDropped > 0 {
			reason += fmt.Sprintf(", %d dropped for missing values", r.RowsDropped)
		}
		return nil, &intake.InputError{File: in.File, Reason: reason + "); a PCA needs at least 3 samples"}
	}
	var keep []int
	for k, name := range in.Variables {
		if lo, hi := fp.sums.Min[k], fp.sums.Max[k]; intake.IsConstantRange(lo, hi) {
			r.DroppedVariables = append(r.DroppedVariables, intake.DroppedVariable{Name: name,
				Reason: "constant: every value is " + strconv.FormatFloat(lo, 'g', -1, 64)})
			continue
		}
		keep = append(keep, k)
	}
	for _, d := range in.Drop {
		r.DroppedVariables = append(r.DroppedVariables, intake.DroppedVariable{Name: d, Reason: "left out with --drop"})
	}
	if len(keep) < 2 {
		p := len(in.Variables)
		return nil, &intake.InputError{File: in.File, Reason: fmt.Sprintf("fewer than 2 variables to analyse (%d candidates, %d of them constant)", p, p-len(keep))}
	}
	for _, k := range keep {
		r.Variables = append(r.Variables, in.Variables[k])
		r.Columns = append(r.Columns, in.Columns[k])
		if in.Units != nil {
			r.Units = append(r.Units, in.Units[k])
		}
	}
	r.Rows = n
	return keep, nil
}

// fit preprocesses and decomposes from the sums.
func (r *StreamResult) fit(s *Sums, transform intake.Transform) error {
	pp, err := PreprocessingFromSums(s, transform, r.Options.Scaling)
	if err != nil {
		return err
	}
	for j, sc := range pp.Scales {
		if !(sc > 0) || math.IsInf(sc, 0) || math.IsNaN(pp.Means[j]) || math.IsInf(pp.Means[j], 0) {
			return &intake.InputError{File: r.Info.File, Column: r.Columns[j], Name: r.Variables[j],
				Reason: "values this large overflow double precision when the column's mean and spread are computed; express the data in other units"}
		}
	}
	r.Prep = pp
	d, err := DecomposeSums(s, pp)
	if err != nil {
		return fmt.Errorf("%s: %w", r.Info.File, err)
	}
	r.Decomp = d
	return nil
}

// sampleReservoir preprocesses the reservoir's rows (kept variables).
func (r *StreamResult) sampleReservoir(res *Reservoir, keep []int) {
	rows := len(res.Values)
	x := mat.NewDense(rows, len(keep), nil)
	for i, row := range res.Values {
		for c, k := range keep {
			x.Set(i, c, (row[k]-r.Prep.Means[c])/r.Prep.Scales[c])
		}
	}
	r.Sample, r.SampleIDs, r.SampleGroups, r.SampleLines = x, res.IDs, res.Groups, res.Lines
	r.Subsampled = rows < r.Rows
}

// countComponents applies the rules: those that need only eigenvalues on
// the whole table, parallel analysis on the reservoir (its own
// eigenvalues against its own permutations). Cross-validation needs every
// row and is not run.
func (r *StreamResult) countComponents() error {
	var pa Parallel
	if r.Options.Permutations > 0 {
		sd, err := Decompose(r.Sample)
		if err != nil {
			return err
		}
		pa = ParallelAnalysis(r.Sample, sd.Eigenvalues, r.Options.Permutations, r.Options.Seed, r.Options.Threads, nil)
	} else if r.Options.Components.Kind == RuleParallel {
		return fmt.Errorf("--components %s needs permutations (--permutations > 0)", r.Options.Components)
	}
	if r.Options.Components.Kind == RuleCV {
		return fmt.Errorf("--components cv needs every row in memory and cannot be used with --stream")
	}
	share := DefaultVarianceShare
	if r.Options.Components.Kind == RuleVariance {
		share = r.Options.Components.Variance
	}
	r.Counts = CountComponents(r.Decomp.Eigenvalues, r.Options.Scaling, share, pa, CrossValidation{})
	for i := range r.Counts.Counts {
		if r.Counts.Counts[i].Rule == RuleCV {
			r.Counts.Counts[i].Note = "not run with --stream (it needs every row in memory)"
		}
	}
	k, err := r.Options.Components.Choose(r.Decomp.Components(), r.Counts)
	if err != nil {
		return err
	}
	if k == 0 {
		k, r.NoStructure = 1, true
	}
	r.Retained = k
	return nil
}
