package train

import (
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
)

func TestCrossValidateLowersFoldsAndSaysSo(t *testing.T) {
	// 40 digs of the demo in which one class has 3 digs: 5 stratified
	// folds cannot each hold one, so 3 are used, and the report says so.
	ds, _ := demo(t)
	var idx []int
	rare := -1
	perClass := map[int32]int{}
	for i, y := range ds.Y {
		if rare < 0 && ds.Classes[y] == "gold/ring" {
			rare = int(y)
		}
		limit := 10
		if int(y) == rare {
			limit = 3
		}
		if perClass[y] < limit {
			perClass[y]++
			idx = append(idx, i)
		}
	}
	small := ds.Subset(idx)
	ev, err := CrossValidate(context.Background(), small, EvalOptions{Folds: 5, Seed: 1, Forest: Options{Trees: 10}})
	if err != nil {
		t.Fatal(err)
	}
	all := strings.Join(ev.Warnings, " | ")
	if ev.Folds != 3 || !strings.Contains(all, "folds lowered from 5 to 3: the smallest class has 3 digs") ||
		!strings.Contains(all, "small history") || !strings.Contains(all, "gold/ring (3)") {
		t.Errorf("folds %d, warnings %q", ev.Folds, all)
	}
}

func TestVerdictWhenTheOneNumberDoesBetter(t *testing.T) {
	e := &Evaluation{BaselineAxis: "display_id", Model: Metrics{LogLoss: 1.2, Accuracy: 0.6}, Baseline: Metrics{LogLoss: 1.0, Accuracy: 0.62}}
	if v := e.Verdict(); !strings.Contains(v, "the one number (display_id) does as well as spade or better") {
		t.Errorf("verdict %q", v)
	}
	e.Model = Metrics{LogLoss: 0.6, Accuracy: 0.8}
	if v := e.Verdict(); v != "" {
		t.Errorf("spade better, verdict %q", v)
	}
}

func TestGroupFolds(t *testing.T) {
	groups := []string{"a", "a", "a", "b", "b", "c", "d", "a", "b"}
	fold, k, err := GroupFolds(groups, 3)
	if err != nil || k != 3 {
		t.Fatal(k, err)
	}
	// Whole groups: every row of a group in one fold; largest first to the
	// lightest fold: a(4)→0, b(3)→1, c(1)→2, d(1)→2.
	want := map[string]int{"a": 0, "b": 1, "c": 2, "d": 2}
	for i, g := range groups {
		if fold[i] != want[g] {
			t.Errorf("row %d (%s) in fold %d, want %d", i, g, fold[i], want[g])
		}
	}
	if _, _, err := GroupFolds([]string{"x", "x"}, 5); err == nil {
		t.Error("one group accepted")
	}
	if _, k, _ := GroupFolds([]string{"x", "y", "x"}, 5); k != 2 {
		t.Errorf("two groups, %d folds", k)
	}
}

func TestLearningCurve(t *testing.T) {
	ds, _ := demo(t)
	ev, err := CrossValidate(context.Background(), ds, EvalOptions{Folds: 5, Seed: 1, Forest: Options{Trees: 40}, LearningCurve: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(ev.Learning) != 4 || ev.Learning[3].Digs != 1200 || ev.Learning[0].Digs != 300 {
		t.Fatalf("curve %+v", ev.Learning)
	}
	// The full share is the evaluation itself.
	if last := ev.Learning[3]; last.LogLoss != ev.Model.LogLoss || last.Accuracy != ev.Model.Accuracy {
		t.Errorf("100%% point %+v, model %v / %v", last, ev.Model.Accuracy, ev.Model.LogLoss)
	}
	// A quarter of the history is worse than all of it (demo history:
	// measured 2026-12-02, log-loss about 0.15 higher at 25 %).
	if ev.Learning[0].LogLoss < ev.Learning[3].LogLoss+0.05 {
		t.Errorf("curve does not fall: %+v", ev.Learning)
	}
	if ev.LearningVerdict == "" {
		t.Error("no learning verdict")
	}
	// The same curve without shrinkage, for the README (run with -v).
	raw, err := CrossValidate(context.Background(), ds, EvalOptions{Folds: 5, Seed: 1, Forest: Options{Trees: 40}, LearningCurve: true, Raw: true})
	if err != nil {
		t.Fatal(err)
	}
	for j, p := range ev.Learning {
		r := raw.Learning[j]
		t.Logf("%4d digs: raw accuracy %.3f log-loss %.3f; shrunk accuracy %.3f log-loss %.3f", p.Digs, r.Accuracy, r.LogLoss, p.Accuracy, p.LogLoss)
		if p.LogLoss >= r.LogLoss {
			t.Errorf("%d digs: shrinkage does not lower the log-loss (%.3f vs %.3f raw)", p.Digs, p.LogLoss, r.LogLoss)
		}
	}
}

func TestBaselineOnlyIsTheFullLogsBaseline(t *testing.T) {
	// A log of display IDs only is evaluated by the one number alone. Its
	// figures must be the very ones the same digs' full log gives for its
	// baseline: the folds depend on the classes and the seed only, and the
	// baseline reads only the display ID (tolerance 1e-12, rounding only).
	digs, _, err := datasets.Simulate(datasets.Options{N: 400, Seed: 11})
	if err != nil {
		t.Fatal(err)
	}
	full := &features.Log{Name: "sim", Freqs: datasets.DefaultFreqs, Digs: digs, HasDisplayID: true}
	ds, err := FromLog(full, features.NewSpec(full.Freqs, true), features.LabelBoth)
	if err != nil {
		t.Fatal(err)
	}
	ids := &features.Log{Name: "ids", Digs: make([]features.Dig, len(digs)), HasDisplayID: true, DisplayIDOnly: true}
	for i, d := range digs {
		d.Readings, d.Ground = nil, nil
		ids.Digs[i] = d
	}
	idDS, err := FromDisplayIDs(ids, features.LabelBoth)
	if err != nil {
		t.Fatal(err)
	}
	keep := []string{"gold/ring", "silver/coin"}
	a, err := CrossValidate(context.Background(), ds, EvalOptions{Folds: 5, Seed: 3, Forest: Options{Trees: 10}, Keepers: keep})
	if err != nil {
		t.Fatal(err)
	}
	b, err := CrossValidate(context.Background(), idDS, EvalOptions{Folds: 5, Seed: 3, BaselineOnly: true, LearningCurve: true, Keepers: keep})
	if err != nil {
		t.Fatal(err)
	}
	if !b.BaselineOnly || b.Probs != nil || b.Learning != nil || b.Model.Accuracy != 0 || b.DigSaving.Model != nil {
		t.Errorf("baseline-only evaluation carries model figures: %+v", b)
	}
	if math.Abs(a.Baseline.LogLoss-b.Baseline.LogLoss) > 1e-12 || math.Abs(a.Baseline.Accuracy-b.Baseline.Accuracy) > 1e-12 ||
		a.DigSaving.Baseline[1].TrashSkipped != b.DigSaving.Baseline[1].TrashSkipped {
		t.Errorf("baseline %+v against the full log's %+v", b.Baseline, a.Baseline)
	}
	if !slices.Contains(b.Warnings, DisplayIDOnlyNote) {
		t.Errorf("warnings %q lack the display-ID-only note", b.Warnings)
	}
}

func TestParseMaxSamples(t *testing.T) {
	// A count, or a fraction rounded as scikit-learn rounds max_samples
	// (max(round(n·f), 1)); anything else an error saying what it wants.
	for s, want := range map[string]int{"": 0, "50000": 50000, "0.2": 200, "1.0": 1000, "1e-9": 1, "0.0005": 1} {
		if got, err := ParseMaxSamples(s, 1000); err != nil || got != want {
			t.Errorf("%q: %d, %v; want %d", s, got, err, want)
		}
	}
	for _, s := range []string{"0", "-3", "1.5", "0.0", "abc", "20%"} {
		if _, err := ParseMaxSamples(s, 1000); err == nil || !strings.Contains(err.Error(), "fraction of the history") {
			t.Errorf("%q: %v", s, err)
		}
	}
}
