package analysis

import (
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// trainedModel builds the model pcqc run would write for seeded data.
func trainedModel(t *testing.T, n, p, k int, scaling Scaling, transform intake.Transform) *Model {
	t.Helper()
	x, _ := synth.LowRank(synth.RNG(uint64(n*p+k), 74), n, p, []float64{5, 3, 2}, 0.5)
	if transform != intake.TransformNone {
		// Positive values, so that every transform applies.
		for i := 0; i < n; i++ {
			for j := 0; j < p; j++ {
				x.Set(i, j, 20+x.At(i, j))
			}
		}
	}
	tab := intake.TableFromMatrix("train.csv", x, nil, nil)
	tab.Transform = transform
	if transform != intake.TransformNone {
		raw := tab.X.RawMatrix().Data
		for i, v := range raw {
			raw[i], _ = transform.Apply(v)
		}
	}
	res, err := Analyze(tab, Options{Scaling: scaling, Components: ComponentRule{Kind: RuleFixed, Fixed: k}})
	if err != nil {
		t.Fatal(err)
	}
	return NewModel(res, "test")
}

// Every model pcqc writes passes its own validation and loads back equal:
// each scaling and transform, tall and wide data, n = k + 1 (the smallest
// training set a fixed --components allows) and every component retained
// (no residual space, Q method "none").
func TestWrittenModelsValidate(t *testing.T) {
	cases := []struct {
		name    string
		n, p, k int
		scaling Scaling
		tf      intake.Transform
	}{
		{"unit", 60, 6, 2, ScaleUnit, intake.TransformNone},
		{"none", 60, 6, 2, ScaleNone, intake.TransformNone},
		{"pareto", 60, 6, 3, ScalePareto, intake.TransformNone},
		{"range", 60, 6, 1, ScaleRange, intake.TransformNone},
		{"log unit", 40, 5, 2, ScaleUnit, intake.TransformLog},
		{"log1p none", 40, 5, 2, ScaleNone, intake.TransformLog1p},
		{"wide", 12, 40, 3, ScaleUnit, intake.TransformNone},
		{"wide none", 12, 40, 11, ScaleNone, intake.TransformNone},
		{"n = k+1", 4, 6, 3, ScaleUnit, intake.TransformNone},
		{"all retained", 30, 4, 4, ScaleUnit, intake.TransformNone},
	}
	for _, c := range cases {
		m := trainedModel(t, c.n, c.p, c.k, c.scaling, c.tf)
		path := filepath.Join(t.TempDir(), "model.json")
		if err := m.Save(path); err != nil {
			t.Fatal(err)
		}
		back, err := LoadModel(path)
		if err != nil {
			t.Errorf("%s: a model pcqc wrote is refused: %v", c.name, err)
			continue
		}
		if !reflect.DeepEqual(m, back) {
			t.Errorf("%s: the model changed on a round trip", c.name)
		}
	}
}

// Every broken rule of a model is refused with "damaged model: " and what
// is wrong, and a model of a newer format with its own message. Mutations
// start from a model pcqc wrote (unit scaling, 5 variables, 2 components).
func TestDamagedModelsAreRefused(t *testing.T) {
	base := trainedModel(t, 50, 5, 2, ScaleUnit, intake.TransformNone)
	good, err := json.MarshalIndent(base, "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	copyModel := func() *Model {
		var m Model
		if err := json.Unmarshal(good, &m); err != nil {
			t.Fatal(err)
		}
		return &m
	}
	edit := func(f func(m *Model)) string {
		m := copyModel()
		f(m)
		b, err := json.Marshal(m)
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	text := func(old, new string) string {
		if !strings.Contains(string(good), old) {
			t.Fatalf("the model has no %q", old)
		}
		return strings.Replace(string(good), old, new, 1)
	}
	cases := []struct {
		name, model, want string
	}{
		// Dimensions.
		{"unknown encoding", edit(func(m *Model) { m.Input.Encoding = "ebcdic" }), `input encoding "ebcdic" is not utf-8, latin1 or cp1252`},
		{"one variable", edit(func(m *Model) { m.Variables = m.Variables[:1] }), "1 variables; a model has at least 2"},
		{"means short", edit(func(m *Model) { m.Means = m.Means[:4] }), "means has 4 values for 5 variables"},
		{"sds long", edit(func(m *Model) { m.SDs = append(m.SDs, 1) }), "sds has 6 values for 5 variables"},
		{"loadings rows", edit(func(m *Model) { m.Loadings = m.Loadings[1:] }), "loadings has 4 values for 5 variables"},
		{"loadings row length", edit(func(m *Model) { m.Loadings[3] = append(m.Loadings[3], 0) }), `the loadings of "v4" have 3 values for 2 retained components`},
		{"retained 0", edit(func(m *Model) { m.Retained = 0 }), "0 components retained of 5 eigenvalues"},
		{"retained beyond", edit(func(m *Model) { m.Retained = 6 }), "6 components retained of 5 eigenvalues"},
		{"too many eigenvalues", edit(func(m *Model) { m.Eigenvalues = append(m.Eigenvalues, 0) }), "6 eigenvalues for 5 variables and 50 training samples"},
		{"no eigenvalues", edit(func(m *Model) { m.Eigenvalues = nil }), "0 eigenvalues"},
		{"two samples", edit(func(m *Model) { m.Input.Rows = 2 }), "2 training samples"},
		{"implausible samples", edit(func(m *Model) { m.Input.Rows = 1 << 62 }), "training samples; a model is built from 3 to 10¹²"},
		{"fewer samples than eigenvalues", edit(func(m *Model) { m.Input.Rows = 4 }), "there are 1 to min(p, n−1) = 3"},
		// Names.
		{"duplicate name", edit(func(m *Model) { m.Variables[3] = m.Variables[1] }), `variable "v2" is listed twice (variables 2 and 4)`},
		{"empty name", edit(func(m *Model) { m.Variables[2] = " " }), "variable 3 has no name"},
		// Preprocessing.
		{"transform", edit(func(m *Model) { m.Transform = "sqrt" }), `transform "sqrt" is not one of`},
		{"scaling", edit(func(m *Model) { m.Scaling = "auto" }), `scaling "auto" is not one of`},
		{"zero scale", edit(func(m *Model) { m.Scales[2] = 0 }), `the scale of "v3" is 0; it must be finite and > 0`},
		{"negative scale", edit(func(m *Model) { m.Scales[0] = -1 }), `the scale of "v1" is -1`},
		{"zero sd", edit(func(m *Model) { m.SDs[4] = 0 }), `the standard deviation of "v5" is 0`},
		{"scale not the sd", edit(func(m *Model) { m.Scales[1] *= 2 }), "but unit variance makes it"},
		{"scaling changed", edit(func(m *Model) { m.Scaling = ScaleNone }), "but no scaling makes it 1"},
		// Eigenvalues.
		{"negative eigenvalue", edit(func(m *Model) { m.Eigenvalues[4] = -0.5 }), "eigenvalue 5 is -0.5; eigenvalues are ≥ 0"},
		{"increasing", edit(func(m *Model) { m.Eigenvalues[0], m.Eigenvalues[1] = m.Eigenvalues[1], m.Eigenvalues[0] }), "is larger than eigenvalue 1"},
		{"retained zero", edit(func(m *Model) {
			for a := 1; a < 5; a++ {
				m.Eigenvalues[a] = 0
			}
		}), "retained eigenvalue 2 is 0; T² divides by it"},
		{"sum", edit(func(m *Model) { m.Eigenvalues[0] *= 1.01 }), "the eigenvalues sum to"},
		// Loadings.
		{"not orthonormal", edit(func(m *Model) { m.Loadings[0][0] += 1e-3 }), "the loadings are not orthonormal"},
		{"zero loadings", edit(func(m *Model) {
			for _, r := range m.Loadings {
				r[0], r[1] = 0, 0
			}
		}), "the loadings are not orthonormal (max |VᵀV − I| = 1"},
		{"denormal loadings", edit(func(m *Model) {
			for _, r := range m.Loadings {
				r[0], r[1] = 5e-324, 5e-324
			}
		}), "the loadings are not orthonormal"},
		// Limits.
		{"zero T² limit", edit(func(m *Model) { m.Limits.T2_95 = 0 }), "the T² limits are 0 (95 %)"},
		{"T² limits reversed", edit(func(m *Model) { m.Limits.T2_99 = m.Limits.T2_95 / 2 }), "they must be finite, > 0 and in that order"},
		{"Q method unknown", edit(func(m *Model) { m.Limits.QMethod = "guess" }), `the Q method "guess" is not one of`},
		{"Q none with residual", edit(func(m *Model) { m.Limits.QMethod = QNone }), `the Q method is "none", but the eigenvalues left out are not all zero`},
		{"negative Q limit", edit(func(m *Model) { m.Limits.Q95 = -1 }), "the Q limits are -1 (95 %)"},
		{"Q limits reversed", edit(func(m *Model) { m.Limits.Q99 = m.Limits.Q95 / 2 }), "the Q limits are"},
		// The file itself.
		{"not JSON", "id,a,b\n1,2,3\n", "damaged model: not valid JSON: invalid character 'i'"},
		{"truncated", string(good[:len(good)/2]), "damaged model: not valid JSON: unexpected end of JSON input"},
		{"trailing text", string(good) + "\nextra", "damaged model: not valid JSON: invalid character 'e' after top-level value"},
		{"NaN", text(`"t2_95": `, `"t2_95": NaN, "x": `), "damaged model: not valid JSON"},
		{"overflowing number", text(`"retained": 2`, `"retained": 2, "means": [1e400]`), "damaged model: means holds number 1e400 where a float64 belongs"},
		{"string for number", text(`"retained": 2`, `"retained": "two"`), "damaged model: retained holds string where a int belongs"},
		{"unknown field", text(`"retained": 2`, `"retained": 2, "rotation": "varimax"`), `model.json:42:18: damaged model: unknown field "rotation"`},
		{"no format", text(`"format": 1`, `"formats": 1`), "damaged model: no format number"},
		{"empty", "", "damaged model: not valid JSON: unexpected end of JSON input"},
		{"null", "null", "damaged model: no format number"},
		{"newer format", text(`"format": 1`, `"format": 2`), "the model is in format 2, newer than the format 1"},
	}
	for _, c := range cases {
		_, err := decodeModel("model.json", []byte(c.model))
		var ie *intake.InputError
		if !errors.As(err, &ie) || ie.File != "model.json" || !strings.Contains(ie.Error(), c.want) {
			t.Errorf("%s: got %v, want an input error with %q", c.name, err, c.want)
			continue
		}
		if !strings.HasPrefix(ie.Reason, "damaged model: ") && c.name != "newer format" {
			t.Errorf("%s: reason %q does not start with \"damaged model: \"", c.name, ie.Reason)
		}
		if strings.ContainsAny(ie.Error(), "\n\r") {
			t.Errorf("%s: the message is not one line: %q", c.name, ie.Error())
		}
	}
	if _, err := decodeModel("model.json", good); err != nil {
		t.Fatalf("the unedited model is refused: %v", err)
	}
}

// A JSON error names the line and column of the problem.
func TestDamagedModelNamesThePosition(t *testing.T) {
	cases := []struct {
		text      string
		line, col int
	}{
		{"{\n  \"format\": 1,\n  \"retained\": x\n}", 3, 15},
		{"{\n  \"format\": 1,\n  \"means\": [1, 2, 1e999]\n}", 3, 23},
	}
	for _, c := range cases {
		_, err := decodeModel("model.json", []byte(c.text))
		var ie *intake.InputError
		if !errors.As(err, &ie) || ie.Line != c.line || ie.Column != c.col {
			t.Errorf("%q: got %v (line %d, column %d), want line %d column %d", c.text, err, ie.Line, ie.Column, c.line, c.col)
		}
	}
}

// LoadModel reads model.json only when it is a regular file; a missing one
// says what the folder should be.
func TestLoadModelRefusesWhatIsNotAModelFile(t *testing.T) {
	dir := t.TempDir()
	if _, err := LoadModel(filepath.Join(dir, "model.json")); err == nil || !strings.Contains(err.Error(), "cannot read the model: no such file or directory (is this a folder written by pcqc run?)") {
		t.Errorf("missing: %v", err)
	}
	os.Mkdir(filepath.Join(dir, "model.json"), 0o755)
	if _, err := LoadModel(filepath.Join(dir, "model.json")); err == nil || !strings.Contains(err.Error(), "cannot read the model: it is a folder") {
		t.Errorf("folder: %v", err)
	}
}

// Apply on a validated model gives finite statistics: the validation leaves
// no zero divisor and no non-orthonormal projection behind.
func TestValidatedModelAppliesFinitely(t *testing.T) {
	m := trainedModel(t, 50, 5, 2, ScaleUnit, intake.TransformNone)
	x := mat.NewDense(3, 5, []float64{0, 1, 2, 3, 4, -5, 0, 5, 0, -5, 1e6, 0, 0, 0, 0})
	app := Apply(m, intake.TableFromMatrix("new.csv", x, nil, nil))
	for i := range app.T2 {
		if !isFinite(app.T2[i]) || !isFinite(app.Q[i]) {
			t.Errorf("sample %d: T² %v, Q %v", i, app.T2[i], app.Q[i])
		}
	}
}
