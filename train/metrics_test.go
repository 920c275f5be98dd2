package train

import (
	"errors"
	"math"
	"slices"
	"testing"

	"github.com/spade-detect/spade/features"
	"gonum.org/v1/gonum/floats/scalar"
)

func TestScoreAgainstScikitLearn(t *testing.T) {
	// Values computed with scikit-learn 1.2.1: accuracy_score, log_loss,
	// balanced_accuracy_score and precision_recall_fscore_support
	// (zero_division=0) on this case.
	classes := []string{"a", "b", "c"}
	y := []int32{0, 0, 1, 2, 1, 0, 2, 2}
	p := [][]float64{{0.7, 0.2, 0.1}, {0.3, 0.4, 0.3}, {0.1, 0.8, 0.1}, {0.2, 0.2, 0.6}, {0.5, 0.4, 0.1}, {0.9, 0.05, 0.05}, {0.1, 0.1, 0.8}, {0.3, 0.3, 0.4}}
	m := Score(classes, y, p)
	check := func(name string, got, want, tol float64) {
		if !scalar.EqualWithinAbs(got, want, tol) {
			t.Errorf("%s = %v, want %v", name, got, want)
		}
	}
	check("accuracy", m.Accuracy, 0.75, 1e-12)
	check("log-loss", m.LogLoss, 0.5569628067581518, 1e-12)
	check("balanced accuracy", m.BalancedAccuracy, 0.7222222222222222, 1e-12)
	for k, want := range []float64{0.6666666666666666, 0.5, 1.0} {
		c := m.PerClass[classes[k]]
		check("precision "+classes[k], c.Precision, want, 1e-12)
		check("recall "+classes[k], c.Recall, want, 1e-12)
		check("f1 "+classes[k], c.F1, want, 1e-12)
	}
	// ECE by hand, 10 equal-width bins of the top probability: bins 0.4
	// (2 rows, conf 0.4, acc 0.5), 0.5 (conf 0.5, acc 0), 0.6, 0.7, 0.8
	// (2 rows) and 0.9 (all right): 0.025+0.0625+0.05+0.0375+0.05+0.0125.
	check("ECE", m.ECE, 0.2375, 1e-12)
	if m.Confusion["a"]["b"] != 1 || m.Confusion["b"]["a"] != 1 || m.Confusion["c"]["c"] != 3 {
		t.Errorf("confusion %v", m.Confusion)
	}
}

func TestBrierTwoClassesIsTwiceBinary(t *testing.T) {
	// scikit-learn 1.2.1 brier_score_loss (binary, positive-class
	// probability) gives 0.1265625 here; Brier's (1950) all-class score of
	// a two-class problem is exactly twice it.
	y := []int32{1, 0, 1, 1, 0, 0, 1, 0}
	pos := []float64{0.9, 0.2, 0.6, 0.4, 0.3, 0.55, 0.8, 0.1}
	p := make([][]float64, len(pos))
	for i, v := range pos {
		p[i] = []float64{1 - v, v}
	}
	if m := Score([]string{"n", "y"}, y, p); !scalar.EqualWithinAbs(m.Brier, 2*0.12656250000000002, 1e-12) {
		t.Errorf("Brier %v, want %v", m.Brier, 2*0.1265625)
	}
}

func TestScoreSkipsRowsWithoutVotes(t *testing.T) {
	m := Score([]string{"a", "b"}, []int32{0, 1}, [][]float64{{1, 0}, {math.NaN(), math.NaN()}})
	if m.Accuracy != 1 || m.LogLoss != 0 {
		t.Errorf("accuracy %v, log-loss %v", m.Accuracy, m.LogLoss)
	}
}

func TestStratifiedFoldsBalance(t *testing.T) {
	y := make([]int32, 0, 103)
	for c, n := range []int{50, 30, 23} {
		for range n {
			y = append(y, int32(c))
		}
	}
	fold := StratifiedFolds(y, 3, 5, 1)
	size := make([]int, 5)
	per := make([][]int, 3)
	for c := range per {
		per[c] = make([]int, 5)
	}
	for i, f := range fold {
		size[f]++
		per[y[i]][f]++
	}
	for f := range 5 {
		if size[f] < 20 || size[f] > 21 {
			t.Errorf("fold %d has %d rows", f, size[f])
		}
		for c, n := range []int{50, 30, 23} {
			if lo := n / 5; per[c][f] < lo || per[c][f] > lo+1 {
				t.Errorf("class %d has %d rows in fold %d", c, per[c][f], f)
			}
		}
	}
}

func TestSavingCurveByHand(t *testing.T) {
	// Ten keepers scored 0.1..1.0 and ten trash scored 0.05..0.95.
	var score []float64
	var keeper, trash []bool
	for i := 1; i <= 10; i++ {
		score = append(score, float64(i)/10, float64(i)/10-0.05)
		keeper = append(keeper, true, false)
		trash = append(trash, false, true)
	}
	pts := SavingCurve(score, keeper, trash, []float64{0.9, 1.0})
	// Keep 90 %: may lose one keeper (0.1): threshold 0.2, trash below it
	// 0.05 and 0.15: 2 of 10.
	if pts[0].Threshold != 0.2 || pts[0].TrashSkipped != 0.2 {
		t.Errorf("90 %%: %+v", pts[0])
	}
	// Keep all: threshold 0.1, only 0.05 is skipped.
	if pts[1].Threshold != 0.1 || pts[1].TrashSkipped != 0.1 {
		t.Errorf("100 %%: %+v", pts[1])
	}
}

func TestBaselineBins(t *testing.T) {
	// Two classes cleanly split by the number: the baseline learns it.
	var v []float64
	var y []int32
	for i := range 400 {
		v = append(v, float64(i))
		y = append(y, int32(i/200))
	}
	b := FitBaseline("display_id", v, y, 2)
	if p := b.Predict(10); p[0] < 0.95 {
		t.Errorf("low bin shares %v", p)
	}
	if p := b.Predict(390); p[1] < 0.95 {
		t.Errorf("high bin shares %v", p)
	}
	if len(b.Cuts) != 7 { // min(max(400/50, 4), 25) = 8 bins
		t.Errorf("%d cuts, want 7", len(b.Cuts))
	}
}

func TestGroupsOf(t *testing.T) {
	log := &features.Log{Name: "g.csv", Digs: []features.Dig{
		{Line: 2, Site: "field A", Date: "2025-04-03"},
		{Line: 3, Site: "beach", Date: "2025-05-19"},
	}}
	for by, want := range map[string][]string{"site": {"field A", "beach"}, "date": {"2025-04-03", "2025-05-19"}, "month": {"2025-04", "2025-05"}} {
		got, err := GroupsOf(log, by)
		if err != nil || !slices.Equal(got, want) {
			t.Errorf("%s: %v, %v; want %v", by, got, err, want)
		}
	}
	if g, err := GroupsOf(log, ""); g != nil || err != nil {
		t.Errorf("no grouping: %v, %v", g, err)
	}
	if _, err := GroupsOf(log, "week"); !errors.Is(err, ErrGroupBy) {
		t.Errorf("week: %v, want ErrGroupBy", err)
	}
	log.Digs[1].Site = ""
	var pe *features.ParseError
	if _, err := GroupsOf(log, "site"); !errors.As(err, &pe) || pe.Line != 3 || pe.Column != "site" || !errors.Is(err, features.ErrMissingValue) {
		t.Errorf("missing site: %v, want a ParseError at line 3, column site", err)
	}
}
