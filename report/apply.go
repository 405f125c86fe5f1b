package report

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
)

// An application of a saved model to new samples: its tables, summary and
// report.

// ApplyRun is everything one application produced.
type ApplyRun struct {
	App    *analysis.Application
	Checks []checks.Result
	// TrainingScores, when the audit folder still holds scores.csv, are
	// drawn behind the new samples; nil otherwise.
	TrainingScores *mat.Dense
	AuditDir       string
}

// WriteModel writes model.json, what apply needs from a run.
func WriteModel(dir string, res *analysis.Result, version string) error {
	return analysis.NewModel(res, version).Save(filepath.Join(dir, "model.json"))
}

// ApplySummary is summary.json of an application.
type ApplySummary struct {
	Tool    ToolInfo        `json:"tool"`
	Input   ApplyInput      `json:"input"`
	Model   ApplyModelInfo  `json:"model"`
	Options Options         `json:"options"`
	Limits  LimitsInfo      `json:"limits"`
	Batch   BatchInfo       `json:"batch"`
	Checks  []checks.Result `json:"checks"`
	Verdict checks.Status   `json:"verdict"`
}

type ApplyInput struct {
	TableSource
	IDColumn    *string                  `json:"id_column"`
	GroupColumn *string                  `json:"group_column"`
	Ignored     []string                 `json:"columns_ignored"`
	Dropped     []intake.DroppedVariable `json:"variables_dropped"`
	Missing     MissingInfo              `json:"missing"` // see missing.go
}

type ApplyModelInfo struct {
	AuditDir    string   `json:"audit_dir"`
	File        string   `json:"file"`
	SHA256      string   `json:"sha256"`
	Rows        int      `json:"rows"`
	Retained    int      `json:"retained"`
	Variables   []string `json:"variables"`
	Transform   string   `json:"transform"`
	Scaling     string   `json:"scaling"`
	PCQCVersion string   `json:"pcqc_version"`
}

type BatchInfo struct {
	MissingVariables []string        `json:"missing_variables"`
	Beyond           map[string]int  `json:"beyond"`
	Shift            []VariableShift `json:"shift"`
	Flagged          []string        `json:"flagged"`
}

type VariableShift struct {
	Variable string `json:"variable"`
	ShiftSD  Number `json:"shift_sd"`
}

func buildApplySummary(run ApplyRun, meta Meta) ApplySummary {
	app := run.App
	t, m := app.Table, app.Model
	s := ApplySummary{
		Tool: ToolInfo{Name: "pcqc", Version: meta.Version},
		Input: ApplyInput{TableSource: tableSource(t), Missing: missingInfo(t, batchImputedCells(t)),
			IDColumn: optional(t.IDColumn), GroupColumn: optional(t.GroupColumn), Ignored: app.Extra, Dropped: t.DroppedVariables},
		Model: ApplyModelInfo{AuditDir: run.AuditDir, File: m.Input.File, SHA256: m.Input.SHA256, Rows: m.Input.Rows, Retained: m.Retained,
			Variables: m.Variables, Transform: string(m.Transform), Scaling: string(m.Scaling), PCQCVersion: m.Tool.Version},
		Options: meta.Options,
		Limits: LimitsInfo{T2_95: Number(app.Limits.T2_95), T2_99: Number(app.Limits.T2_99), Q95: Number(app.Limits.Q95), Q99: Number(app.Limits.Q99),
			QMethod: string(app.Limits.QMethod), Leverage: Number(analysis.LeverageFactor * float64(m.Retained+1) / float64(m.Input.Rows)),
			FamilyAlpha: Number(analysis.FamilyAlpha), FamilyConfidence: Number(app.FamilyConf), T2Family: Number(app.T2Family), QFamily: Number(app.QFamily),
			Influence95: Number(math.NaN())},
		Batch:   BatchInfo{MissingVariables: app.Missing, Beyond: map[string]int{}},
		Checks:  jsonChecks(run.Checks),
		Verdict: checks.Verdict(run.Checks),
	}
	if s.Input.Ignored == nil {
		s.Input.Ignored = []string{}
	}
	if s.Input.Dropped == nil {
		s.Input.Dropped = []intake.DroppedVariable{}
	}
	if s.Batch.MissingVariables == nil {
		s.Batch.MissingVariables = []string{}
	}
	s.Batch.Flagged = []string{}
	if app.Scores != nil {
		for _, lim := range []struct {
			name   string
			values []float64
			limit  float64
		}{{"t2_95", app.T2, app.Limits.T2_95}, {"t2_99", app.T2, app.Limits.T2_99}, {"q_95", app.Q, app.Limits.Q95}, {"q_99", app.Q, app.Limits.Q99}} {
			c, _ := analysis.CountAbove(lim.values, lim.limit)
			s.Batch.Beyond[lim.name] = c
		}
		for j, v := range m.Variables {
			s.Batch.Shift = append(s.Batch.Shift, VariableShift{Variable: v, ShiftSD: Number(app.Shift[j])})
		}
		for _, i := range app.Flagged {
			s.Batch.Flagged = append(s.Batch.Flagged, t.IDs[i])
		}
	}
	return s
}

// WriteApplyTables writes scores.csv, samples.csv, contributions.csv and
// summary.json of an application into dir.
func WriteApplyTables(dir string, run ApplyRun, meta Meta) error {
	app := run.App
	join := func(name string) string { return filepath.Join(dir, name) }
	if app.Scores != nil {
		if err := writeScores(join("scores.csv"), app.Table, app.Scores); err != nil {
			return err
		}
		header := []string{IDHeader(app.Table), "t2", "q", "leverage", "beyond"}
		err := streamCSV(join("samples.csv"), header, len(app.T2), func(i int, dst []string) []string {
			return append(dst, app.Table.IDs[i], num(app.T2[i]), num(app.Q[i]), num(app.Leverage[i]), strings.Join(app.Beyond(i), " "))
		})
		if err != nil {
			return err
		}
		p := len(app.Model.Variables)
		err = streamCSV(join("contributions.csv"), []string{"sample", "variable", "t2_contribution", "q_contribution", "residual"}, len(app.Contributions)*p,
			func(r int, dst []string) []string {
				c := app.Contributions[r/p]
				j := r % p
				return append(dst, app.Table.IDs[c.Sample], app.Model.Variables[j], num(c.T2[j]), num(c.Q[j]), num(c.Residual[j]))
			})
		if err != nil {
			return err
		}
	}
	if err := writeMissingTables(join, app.Table, batchImputedCells(app.Table)); err != nil {
		return err
	}
	return writeJSON(join("summary.json"), buildApplySummary(run, meta))
}

// ApplyDocument is the report of an application.
type ApplyDocument struct {
	Title, Author, Date, Version string
	Invented                     string
	Verdict                      VerdictBlock
	Checks                       []CheckRow

	NewFile, NewSHA256   string
	MissingLists         MissingBlock
	NewSheet             string // the worksheet read, for a workbook
	Rows, RowsRead       int
	Missing              string // how missing cells were handled
	ModelFile, ModelHash string
	ModelRows, Retained  int
	ModelVersion         string
	Preprocessing        string
	Variables            string
	Ignored              string
	MissingVariables     string
	Scored               bool
	Limits               string
	ScoresFigure, T2QFig Figure
	FlaggedHeader        []string
	FlaggedRows          [][]string
	FlaggedNote          string
	ShiftHeader          []string
	ShiftRows            [][]string
	// Contributions holds, for each of the worst samples in turn, its
	// contribution figure and then its signed-residual figure.
	Contributions     []Figure
	ContributionsNote string
	Methods           string
	References        []Reference
	Command           string
	Options           [][2]string
	Cautions          []string

	figures []figureJob
}

func (d *ApplyDocument) page() Page {
	return Page{Title: d.Title, Author: d.Author, Date: d.Date, Version: d.Version, File: d.NewFile, SHA256: d.NewSHA256}
}

// contributionFigures is how many of the worst samples get a contribution
// figure.
const contributionFigures = 3

// BuildApplyDocument fills the report of an application.
func BuildApplyDocument(run ApplyRun, meta Meta, opt ReportOptions) *ApplyDocument {
	app := run.App
	t, m := app.Table, app.Model
	d := &ApplyDocument{
		Title: opt.Title, Author: opt.Author, Date: opt.Date, Version: meta.Version, Invented: opt.Invented,
		NewFile: t.File, NewSHA256: t.SHA256, NewSheet: t.Sheet, Rows: t.Rows(), RowsRead: t.RowsRead,
		ModelFile: m.Input.File, ModelHash: m.Input.SHA256, ModelRows: m.Input.Rows, Retained: m.Retained, ModelVersion: m.Tool.Version,
		Preprocessing: fmt.Sprintf("transform: %s; centred with the training means; scaling: %s, with the training scales", transformText(m.Transform), scalingText(m.Scaling)),
		Variables:     strings.Join(m.Variables, ", "),
		Scored:        app.Scores != nil,
		Command:       shellQuote(meta.Command),
	}
	if d.Title == "" {
		d.Title = "New samples of " + filepath.Base(t.File) + " against the model of " + filepath.Base(m.Input.File)
	}
	d.Verdict, d.Checks = verdictBlock(run.Checks)
	switch {
	case t.MissingCells == 0:
		d.Missing = "no missing cells"
	case t.Missing == intake.MissingDrop:
		d.Missing = fmt.Sprintf("%d missing cells; the %d rows holding them were dropped", t.MissingCells, t.RowsDropped)
	default:
		d.Missing = fmt.Sprintf("%d missing cells replaced by the training means", t.ImputedCells)
	}
	d.MissingLists = missingBlock(t, batchImputedCells(t), true)
	if len(app.Extra) > 0 {
		d.Ignored = strings.Join(app.Extra, ", ")
	}
	d.MissingVariables = strings.Join(app.Missing, ", ")
	d.Options = optionRows(meta.Options)
	d.Cautions = []string{
		"Statistical flags support expert judgement; they do not replace it. A flagged sample is a sample to look at, not a sample to reject.",
		"The limits come from the training data; a model built on too few or unrepresentative samples flags too much or too little.",
		regulationCaution,
	}
	d.Methods, d.References = applyMethods(run, meta)
	if !d.Scored {
		return d
	}
	l := app.Limits
	d.Limits = fmt.Sprintf("Hotelling T² %s (95 %%) and %s (99 %%) for new observations, k(n²−1)/(n(n−k))·F(k, n−k) with n = %d training samples and k = %d (Tracy, Young & Mason 1992); Q residual %s (95 %%) and %s (99 %%) from the training eigenvalues.",
		g4(l.T2_95), g4(l.T2_99), m.Input.Rows, m.Retained, g4(l.Q95), g4(l.Q99))
	d.ScoresFigure = Figure{Stem: "new-scores", Alt: "New samples on the training score plot",
		Caption: "New samples (filled) on the training score plot (training samples as grey rings when the audit folder holds their scores), with the 95 % Hotelling T² ellipse for new observations."}
	if m.Retained == 1 {
		d.ScoresFigure.Caption = "Scores of the new samples on PC1 in input order, with the 95 % Hotelling T² limits for new observations."
	}
	d.T2QFig = Figure{Stem: "new-t2-q", Alt: "Hotelling T² against Q for the new samples",
		Caption: "Hotelling T² against the Q residual of the new samples, with the limits of the training model at 95 % (dashed) and 99 % (solid)."}
	d.FlaggedHeader = []string{IDHeader(t), "T²", "Q", "Limits passed", "Largest contribution to Q"}
	for c, i := range app.Flagged {
		if c >= maxOutlierRows {
			d.FlaggedNote = fmt.Sprintf("The first %d of %d flagged samples are listed; samples.csv holds every sample.", maxOutlierRows, len(app.Flagged))
			break
		}
		cont := app.Contributions[c]
		j := argmaxAbs(cont.Q)
		share := 0.0
		if app.Q[i] > 0 {
			share = cont.Q[j] / app.Q[i]
		}
		largest := fmt.Sprintf("%s (%.0f %%)", m.Variables[j], 100*share)
		if !isFinite(share) {
			largest = notANumber
		}
		d.FlaggedRows = append(d.FlaggedRows, []string{t.IDs[i], g4(app.T2[i]), g4(app.Q[i]), strings.Join(app.Beyond(i), " "), largest})
	}
	if len(app.Flagged) == 0 {
		d.FlaggedNote = "No new sample passes a 99 % limit."
	}
	d.ShiftHeader = []string{"Variable", "Training mean", "Training sd", "Batch mean", "Shift (training sd)"}
	for j, v := range m.Variables {
		batch := m.Means[j] + app.Shift[j]*m.SDs[j]
		mark := ""
		if math.Abs(app.Shift[j]) > checks.ShiftLimit {
			mark = " !"
		}
		shift := fmt.Sprintf("%+.2f%s", app.Shift[j], mark)
		if !isFinite(app.Shift[j]) {
			shift = notANumber
		}
		d.ShiftRows = append(d.ShiftRows, []string{v, g4(m.Means[j]), g4(m.SDs[j]), g4(batch), shift})
	}
	shown := min(contributionFigures, len(app.Contributions))
	for c := 0; c < shown; c++ {
		i := app.Contributions[c].Sample
		d.Contributions = append(d.Contributions,
			Figure{Stem: fmt.Sprintf("contributions-%d", c+1), Alt: "Contributions of " + t.IDs[i],
				Caption: fmt.Sprintf("Contributions of each variable to the T² and the Q residual of sample %s, as shares of each (T² shares may be negative; Westerhuis, Gurden & Smilde 2000).", t.IDs[i])},
			Figure{Stem: fmt.Sprintf("residuals-%d", c+1), Alt: "Signed residuals of " + t.IDs[i],
				Caption: residualCaption(t.IDs[i], c+1, shown, len(app.Flagged), m.Scaling)})
	}
	if len(app.Contributions) > 0 {
		d.ContributionsNote = fmt.Sprintf("contributions.csv holds the contributions and signed residuals of all %d flagged samples.", len(app.Contributions))
	}
	d.figures = append(d.figures,
		figureJob{&d.ScoresFigure, func() drawing { return applyScoresFigure(run) }},
		figureJob{&d.T2QFig, func() drawing {
			return t2qDrawing("New samples: Hotelling T² against Q residual", app.T2, app.Q, applyLimits(app), app.Flagged, t.IDs)
		}})
	for f := range d.Contributions {
		c := app.Contributions[f/2]
		draw := func() drawing { return contributionFigure(app, c) }
		if f%2 == 1 {
			draw = func() drawing { return residualFigure(app, c) }
		}
		d.figures = append(d.figures, figureJob{&d.Contributions[f], draw})
	}
	prepareFigures(d.figures)
	return d
}

func argmaxAbs(x []float64) int {
	best := 0
	for i, v := range x {
		if math.Abs(v) > math.Abs(x[best]) {
			best = i
		}
	}
	return best
}

func applyLimits(app *analysis.Application) analysis.Limits {
	l := app.Limits
	return analysis.Limits{T2_95: l.T2_95, T2_99: l.T2_99, Q95: l.Q95, Q99: l.Q99, QMethod: l.QMethod}
}

// verdictBlock summarises check results for a report.
func verdictBlock(results []checks.Result) (VerdictBlock, []CheckRow) {
	verdict := checks.Verdict(results)
	counts := map[checks.Status]int{}
	var rows []CheckRow
	for _, r := range results {
		counts[r.Status]++
		rows = append(rows, CheckRow{
			ID: r.ID, Title: r.Title, Word: statusWord(r.Status), Symbol: r.Status.Symbol(),
			Measured: formatMeasure(r.Value), Limit: formatMeasure(r.Limit),
			Meaning: firstSentence(r.Message), Message: r.Message, Source: r.Source, Brief: briefLimit(r.Limit),
		})
	}
	v := VerdictBlock{
		Word: strings.ToUpper(string(verdict)), Symbol: verdict.Symbol(),
		Counts: fmt.Sprintf("%d pass, %d warn, %d fail, %d skip", counts[checks.Pass], counts[checks.Warn], counts[checks.Fail], counts[checks.Skip]),
	}
	switch verdict {
	case checks.Pass:
		v.Sentence = "Every check passed."
	case checks.Warn:
		v.Sentence = "Some checks call for attention; see the warnings below."
	case checks.Fail:
		v.Sentence = "At least one check failed: the results should not be used until it is understood."
	}
	return v, rows
}

func applyMethods(run ApplyRun, meta Meta) (string, []Reference) {
	var c citer
	app := run.App
	t, m := app.Table, app.Model
	var b strings.Builder
	fmt.Fprintf(&b, "%d new samples of %s (SHA-256 %s…) were scored with pcqc %s against the principal component model of %s (SHA-256 %s…; %d training samples, %d components, written by pcqc %s).",
		t.Rows(), t.File, t.SHA256[:12], meta.Version, m.Input.File, m.Input.SHA256[:min(12, len(m.Input.SHA256))], m.Input.Rows, m.Retained, m.Tool.Version)
	if app.Scores == nil {
		fmt.Fprintf(&b, " The new data lack the model variables %s, so no sample could be scored.", strings.Join(app.Missing, ", "))
		return b.String(), c.references()
	}
	if m.Transform == intake.TransformNone || m.Transform == "" {
		b.WriteString(" Values were preprocessed with the training means and scales, never re-estimated, and projected on the training loadings.")
	} else {
		fmt.Fprintf(&b, " Values were transformed as in training (%s), preprocessed with the training means and scales, never re-estimated, and projected on the training loadings.", transformText(m.Transform))
	}
	l := app.Limits
	fmt.Fprintf(&b, " Hotelling's T² (Hotelling 1931) was compared with the limit for new observations, k(n² − 1)/(n(n − k))·F(k, n − k) (Tracy et al. 1992; %s at 95 %%, %s at 99 %%), and the Q residual with the training limits (Jackson & Mudholkar 1979; %s and %s).",
		g4(l.T2_95), g4(l.T2_99), g4(l.Q95), g4(l.Q99))
	c.cite("hotelling1931", "tracy1992", "jackson1979")
	b.WriteString(" For samples beyond a 99 % limit, each variable's contribution to T² was computed as in Westerhuis, Gurden & Smilde (2000) and its contribution to Q as its squared residual (Miller, Swanson & Heckler 1998).")
	c.cite("westerhuis2000", "miller1998")
	fmt.Fprintf(&b, " A batch was taken to have drifted in a variable when its mean lay more than %g training standard deviations from the training mean (Shewhart 1931).", checks.ShiftLimit)
	c.cite("shewhart1931")
	return b.String(), c.references()
}

// WriteApplyReport writes the report of an application.
func WriteApplyReport(dir string, run ApplyRun, meta Meta, opt ReportOptions, formats Formats) error {
	if !formats.Any() {
		return nil
	}
	d := BuildApplyDocument(run, meta, opt)
	md, err := renderCiting(func() ([]byte, error) { return renderTemplate("apply.md.tmpl", d) }, &d.References)
	if err != nil {
		return err
	}
	if err := writeRenderings(dir, md, d.figures, d.page(), formats); err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(dir, "references.bib"), BibTeX(d.References), 0o644)
}

func applyScoresFigure(run ApplyRun) drawing {
	app := run.App
	m := app.Model
	n := app.Table.Rows()
	if m.Retained == 1 {
		x, y := make([]float64, n), make([]float64, n)
		for i := 0; i < n; i++ {
			x[i], y[i] = float64(i+1), app.Scores.At(i, 0)
		}
		p := newPlot("New samples on PC1", "new sample (input order)", "PC1")
		p.Add(guides{})
		ann := &labeller{}
		if lim := analysis.T2LimitNew(m.Input.Rows, 1, analysis.Conf95); !math.IsNaN(lim) {
			addLimitPair(p, ann, math.Sqrt(lim*m.Eigenvalues[0]))
		}
		th := thinSamples(x, y, app.Flagged, groupIndex(app.Table))
		left := addGroupedPoints(p, app.Table, x, y, th)
		ann.addPoints(th.subset(x), th.subset(y), vg.Points(sampleRadius))
		nameSamples(ann, app.Table.IDs, app.Flagged, x, y, beyond99)
		dr := drawing{plot: p, w: figWidth, h: figHeight, ann: ann, sampled: th.caption(beyond99)}
		dr.leaveOut(left, "sample")
		return dr
	}
	total := 0.0
	for _, e := range m.Eigenvalues {
		total += e
	}
	axis := func(a int) string {
		return fmt.Sprintf("PC%d · %s (training)", a+1, pctText(100*m.Eigenvalues[a]/total))
	}
	p := newPlot("New samples on the training score plot", axis(0), axis(1))
	p.Add(guides{})
	if lim := analysis.T2LimitNew(m.Input.Rows, 2, analysis.Conf95); !math.IsNaN(lim) {
		addEllipse(p, math.Sqrt(lim*m.Eigenvalues[0]), math.Sqrt(lim*m.Eigenvalues[1]), "95 % T² ellipse, new observations")
	}
	trainingNote := ""
	if tr := run.TrainingScores; tr != nil {
		if r, c := tr.Dims(); c >= 2 {
			tx, ty := make([]float64, r), make([]float64, r)
			for i := 0; i < r; i++ {
				tx[i], ty[i] = tr.At(i, 0), tr.At(i, 1)
			}
			// Training samples are background only: any that cannot be
			// drawn are not counted against the new ones.
			tt := thinSamples(tx, ty, nil, nil)
			tx, ty = tt.subset(tx), tt.subset(ty)
			if !tt.all() {
				trainingNote = fmt.Sprintf(" The grey rings draw %d of the %d training samples: the farthest out in each of %d directions and a seeded random subsample of the rest, stratified by distance from the centre.", len(tt.drawn), tt.total, outlineSectors)
			}
			addScatter(p, tx, ty, draw.GlyphStyle{Color: trainingColor, Shape: draw.RingGlyph{}, Radius: vg.Points(2)}, "training samples")
		}
	}
	x, y := make([]float64, n), make([]float64, n)
	for i := 0; i < n; i++ {
		x[i], y[i] = app.Scores.At(i, 0), app.Scores.At(i, 1)
	}
	th := thinSamples(x, y, app.Flagged, groupIndex(app.Table))
	left := addGroupedPoints(p, app.Table, x, y, th)
	if app.Table.GroupColumn == "" {
		p.Legend.Add("new samples", plotThumb{groupStyle(0)})
	}
	ann := &labeller{}
	ann.addPoints(th.subset(x), th.subset(y), vg.Points(sampleRadius))
	nameSamples(ann, app.Table.IDs, app.Flagged, x, y, beyond99)
	dr := drawing{plot: p, w: figWidth, h: figTall, equalAspect: true, ann: ann, sampled: strings.TrimSpace(th.caption(beyond99) + trainingNote)}
	dr.leaveOut(left, "sample")
	return dr
}

// plotThumb is a legend entry drawn as one glyph.
type plotThumb struct{ style draw.GlyphStyle }

func (t plotThumb) Thumbnail(c *draw.Canvas) { c.DrawGlyph(t.style, c.Center()) }

// contributionFigure shows, for one sample, each variable's share of its T²
// and of its Q, the variables that contribute most at the top.
func contributionFigure(app *analysis.Application, c analysis.Contribution) drawing {
	i := c.Sample
	return contributionBars(app.Model.Variables, app.Table.IDs[i], app.T2[i], app.Q[i], c)
}

// contributionBars draws c's shares of the sample's T² and Q (both given),
// for an application or an audit alike.
func contributionBars(variables []string, id string, t2, q float64, c analysis.Contribution) drawing {
	p := len(variables)
	t2Share, qShare := make([]float64, p), make([]float64, p)
	for j := 0; j < p; j++ {
		if t2 > 0 {
			t2Share[j] = c.T2[j] / t2
		}
		if q > 0 {
			qShare[j] = c.Q[j] / q
		}
	}
	order := make([]int, p)
	for j := range order {
		order[j] = j
	}
	weight := func(j int) float64 { return math.Max(math.Abs(t2Share[j]), qShare[j]) }
	slices.SortStableFunc(order, func(a, b int) int {
		switch {
		case weight(a) > weight(b):
			return -1
		case weight(a) < weight(b):
			return 1
		}
		return 0
	})
	// A variable whose share is not a finite number (the sample's T² or Q
	// overflowed) has no bar to draw.
	order = slices.DeleteFunc(order, func(j int) bool { return !isFinite(t2Share[j]) || !isFinite(qShare[j]) })
	left := p - len(order)
	shown := min(len(order), loadingsShown)
	bars := pairedBars{first: make([]float64, shown), second: make([]float64, shown)}
	names := make([]string, shown)
	for r := 0; r < shown; r++ {
		j := order[r]
		row := shown - 1 - r
		bars.first[row], bars.second[row] = qShare[j], t2Share[j]
		names[row] = figureText(variables[j], maxLabelRunes)
	}
	pl := newPlot("Contributions to the limits passed by "+figureText(id, maxLabelRunes), "share of the sample's statistic", "")
	pl.Legend.Add("share of Q", swatchThumb{mainColor})
	pl.Legend.Add("share of T²", swatchThumb{accent95})
	return namedBars(pl, bars, names, left, 2.4, 0.5)
}

// pairedBars draws two horizontal bars per row, the first above the second.
type pairedBars struct{ first, second []float64 }

func (b pairedBars) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	unit := trY(1) - trY(0)
	zero := trX(0)
	for i := range b.first {
		y := trY(float64(i))
		for k, v := range []float64{b.first[i], b.second[i]} {
			top := y + unit*0.38 - vg.Length(k)*unit*0.38
			bottom := top - unit*0.34
			fill := mainColor
			if k == 1 {
				fill = accent95
			}
			x1 := trX(v)
			c.FillPolygon(fill, []vg.Point{{X: zero, Y: bottom}, {X: x1, Y: bottom}, {X: x1, Y: top}, {X: zero, Y: top}})
		}
	}
	c.StrokeLine2(lineStyle(inkColor, 0.6), zero, c.Min.Y, zero, c.Max.Y)
}

func (b pairedBars) DataRange() (xmin, xmax, ymin, ymax float64) {
	for i := range b.first {
		xmin = math.Min(xmin, math.Min(b.first[i], b.second[i]))
		xmax = math.Max(xmax, math.Max(b.first[i], b.second[i]))
	}
	return xmin, xmax, -0.6, float64(len(b.first)) - 0.4
}

// swatchThumb is a filled legend box.
type swatchThumb struct {
	fill interface{ RGBA() (r, g, b, a uint32) }
}

func (s swatchThumb) Thumbnail(c *draw.Canvas) {
	c.FillPolygon(s.fill, []vg.Point{{X: c.Min.X, Y: c.Min.Y}, {X: c.Max.X, Y: c.Min.Y}, {X: c.Max.X, Y: c.Max.Y}, {X: c.Min.X, Y: c.Max.Y}})
}
