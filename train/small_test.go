package train

import (
	"context"
	"strings"
	"testing"
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
