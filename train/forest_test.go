package train

import (
	"bytes"
	"context"
	"math"
	"runtime"
	"slices"
	"testing"
	"time"

	"github.com/sjwhitworth/golearn/base"
	"github.com/sjwhitworth/golearn/trees"
)

func TestIrisCrossValidation(t *testing.T) {
	// Fisher's iris, 10-fold stratified CV: accuracy >= 0.93 (issue 4;
	// random forests reach about 0.95 on iris in the literature, e.g.
	// Breiman 2001 reports 5.2 % test error).
	ds := iris(t)
	if ds.Rows() != 150 || len(ds.Classes) != 3 {
		t.Fatalf("iris has %d rows and %d classes", ds.Rows(), len(ds.Classes))
	}
	ev, err := CrossValidate(context.Background(), ds, EvalOptions{Folds: 10, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if ev.Model.Accuracy < 0.93 {
		t.Errorf("10-fold accuracy %.3f < 0.93", ev.Model.Accuracy)
	}
}

func TestMatchesScikitLearnOnDemo(t *testing.T) {
	// Reference: scikit-learn 1.2.1 (Debian python3-sklearn),
	// RandomForestClassifier(n_estimators=200, max_features="sqrt") with
	// 5-fold StratifiedKFold(shuffle=True) on `spade features` of the demo
	// history, mean of random_state 1, 2, 3 (train/bench/skref.py; command there):
	// accuracy 0.7982, log-loss 0.6935 (measured again for the demo at 4.3,
	// 9.7, 21.7 and 36.3 kHz). Issue 4: within 2 points and 0.05.
	// Compared raw, as scikit-learn's forest is.
	ds, _ := demo(t)
	ev, err := CrossValidate(context.Background(), ds, EvalOptions{Folds: 5, Seed: 1, Raw: true})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(ev.Model.Accuracy-0.7982) > 0.02 {
		t.Errorf("accuracy %.4f, scikit-learn 0.7982", ev.Model.Accuracy)
	}
	if math.Abs(ev.Model.LogLoss-0.6935) > 0.05 {
		t.Errorf("log-loss %.4f, scikit-learn 0.6935", ev.Model.LogLoss)
	}
	// Shrinkage toward the class shares lowers the held-out log-loss below
	// both (issue 12), at the same accuracy.
	shrunk, err := CrossValidate(context.Background(), ds, EvalOptions{Folds: 5, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("demo, 5-fold: raw accuracy %.3f log-loss %.3f ECE %.3f; shrunk accuracy %.3f log-loss %.3f ECE %.3f",
		ev.Model.Accuracy, ev.Model.LogLoss, ev.Model.ECE, shrunk.Model.Accuracy, shrunk.Model.LogLoss, shrunk.Model.ECE)
	if shrunk.Model.LogLoss >= ev.Model.LogLoss-0.05 || shrunk.Model.LogLoss >= 0.6935 || math.Abs(shrunk.Model.Accuracy-ev.Model.Accuracy) > 0.005 {
		t.Errorf("shrunk: accuracy %.4f, log-loss %.4f; raw %.4f, %.4f", shrunk.Model.Accuracy, shrunk.Model.LogLoss, ev.Model.Accuracy, ev.Model.LogLoss)
	}
	// And the extra frequencies must buy something over the one number.
	if ev.Model.Accuracy < ev.Baseline.Accuracy+0.05 || ev.Model.LogLoss > ev.Baseline.LogLoss {
		t.Errorf("model %.3f / %.3f vs baseline %.3f / %.3f", ev.Model.Accuracy, ev.Model.LogLoss, ev.Baseline.Accuracy, ev.Baseline.LogLoss)
	}
}

func TestGolearnPredictAgrees(t *testing.T) {
	// golearn's own DecisionTreeNode.Predict, on the trees we emit, must
	// reach the leaf our flat arrays reach: the same majority class on every
	// row, and (through ID3DecisionTree.PredictProba) the same leaf shares.
	ds, _ := demo(t)
	b := trainSmall(t, 12, 5)
	f := b.Forest
	inst, attrs, classAttr, err := ds.Instances()
	if err != nil {
		t.Fatal(err)
	}
	x := make([]float64, len(ds.Names))
	for tr := range f.NumTrees() {
		node := f.DecisionTree(tr, attrs, classAttr)
		pred, err := node.Predict(inst)
		if err != nil {
			t.Fatal(err)
		}
		for i := range ds.Rows() {
			x = ds.Row(i, x)
			p := make([]float64, len(f.Classes))
			f.flat.addTree(tr, x, p)
			ours := f.Classes[Argmax(p)]
			if got := base.GetClass(pred, i); got != ours {
				t.Fatalf("tree %d row %d: golearn %s, spade %s", tr, i, got, ours)
			}
		}
		// Leaf shares on a sample of rows.
		id3 := &trees.ID3DecisionTree{Root: node}
		for i := 0; i < ds.Rows(); i += 97 {
			one, _, _, err := ds.Subset([]int{i}).Instances()
			if err != nil {
				t.Fatal(err)
			}
			probs, err := id3.PredictProba(one)
			if err != nil {
				t.Fatal(err)
			}
			x = ds.Row(i, x)
			p := make([]float64, len(f.Classes))
			f.flat.addTree(tr, x, p)
			for _, cp := range probs {
				k := indexOf(f.Classes, cp.ClassValue)
				if math.Abs(p[k]-cp.Probability) > 1e-12 {
					t.Errorf("tree %d row %d class %s: golearn %v, spade %v", tr, i, cp.ClassValue, cp.Probability, p[k])
				}
			}
		}
		if node.ClassDist == nil || sumDist(node.ClassDist) == 0 {
			t.Errorf("tree %d root has no ClassDist", tr)
		}
	}
}

func indexOf(s []string, v string) int {
	for i, x := range s {
		if x == v {
			return i
		}
	}
	return -1
}

func sumDist(d map[string]int) int {
	n := 0
	for _, v := range d {
		n += v
	}
	return n
}

func TestProbabilitiesSumToOne(t *testing.T) {
	ds, _ := demo(t)
	b := trainSmall(t, 30, 2)
	x := make([]float64, len(ds.Names))
	for i := 0; i < ds.Rows(); i += 7 {
		p := b.Forest.Predict(ds.Row(i, x), nil)
		var s float64
		for _, v := range p {
			s += v
		}
		if math.Abs(s-1) > 1e-9 {
			t.Fatalf("row %d: probabilities sum to %v", i, s)
		}
	}
}

func TestSameSeedSameBytesAcrossGOMAXPROCS(t *testing.T) {
	// Issue 4: the same seed gives the same model file, byte for byte, at
	// GOMAXPROCS 1 and 2.
	prev := runtime.GOMAXPROCS(1)
	defer runtime.GOMAXPROCS(prev)
	one, err := trainSmall(t, 20, 11).Marshal()
	if err != nil {
		t.Fatal(err)
	}
	runtime.GOMAXPROCS(2)
	two, _ := trainSmall(t, 20, 11).Marshal()
	if !bytes.Equal(one, two) {
		t.Error("GOMAXPROCS 1 and 2 give different model files")
	}
	other, _ := trainSmall(t, 20, 12).Marshal()
	if bytes.Equal(one, other) {
		t.Error("seeds 11 and 12 give the same model file")
	}
	// Issue 14: nothing of the day it was made is in the bytes, so they
	// are the same tomorrow. The date the model carries is its data's.
	b := trainSmall(t, 20, 11)
	ds, _ := demo(t)
	if b.Summary.Created != "" || b.Summary.LatestDig != slices.Max(ds.Dates) || b.Summary.LatestDig == "" {
		t.Errorf("created %q, latest dig %q; the data's last date is %q", b.Summary.Created, b.Summary.LatestDig, slices.Max(ds.Dates))
	}
	if today := time.Now().UTC().Format(time.DateOnly); !slices.Contains(ds.Dates, today) && bytes.Contains(one, []byte(today)) {
		t.Errorf("the model file holds today's date %s", today)
	}
}

func TestOutOfBagIsHonest(t *testing.T) {
	// Out-of-bag accuracy estimates held-out accuracy (Breiman 2001): it
	// lies well below the in-sample accuracy of a forest of full trees and
	// within a few points of the cross-validated figure.
	ds, _ := demo(t)
	b := trainSmall(t, 100, 3)
	ev, _ := CrossValidate(context.Background(), ds, EvalOptions{Folds: 5, Seed: 3, Forest: Options{Trees: 100}})
	in := Score(ds.Classes, ds.Y, b.Forest.PredictDataset(ds))
	oob := b.Summary.OutOfBag.Accuracy
	if in.Accuracy < 0.99 || math.Abs(oob-ev.Model.Accuracy) > 0.04 {
		t.Errorf("in-sample %.3f, out-of-bag %.3f, CV %.3f", in.Accuracy, oob, ev.Model.Accuracy)
	}
}

func TestFeatureReusedDownAPath(t *testing.T) {
	// One feature, three classes in three bands: only a tree that splits on
	// the same feature twice down a path can separate them (golearn's ID3
	// cannot).
	var rows [][]float64
	var labels []string
	for i := range 90 {
		rows = append(rows, []float64{float64(i)})
		labels = append(labels, []string{"a", "b", "c"}[i/30])
	}
	ds := NewDataset([]string{"x"}, rows, labels)
	f, _, err := Grow(context.Background(), ds, Options{Trees: 10, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	// One split can be right on at most 2/3 of the rows.
	acc := Score(ds.Classes, ds.Y, f.PredictDataset(ds)).Accuracy
	if acc < 0.95 {
		t.Errorf("accuracy %.3f on three bands of one feature", acc)
	}
	tr := f.Tree(0)
	root := tr.Left[0]
	if tr.Feature[0] != 0 || (tr.Feature[root] != 0 && tr.Feature[root+1] != 0) {
		t.Error("tree 0 does not split feature 0 twice down a path")
	}
}

func TestFromInstancesFixedOrder(t *testing.T) {
	// golearn's CSV parser returns attributes in varying order; the
	// table spade builds from it must be the same every time, or the same
	// seed would grow a different forest (measured: iris CV accuracy moved
	// between 0.95 and 0.96 before the order was fixed).
	first := iris(t)
	for range 30 {
		again := iris(t)
		for f := range first.Cols {
			if again.Names[f] != first.Names[f] {
				t.Fatalf("feature %d: %s, then %s", f, first.Names[f], again.Names[f])
			}
			for i, v := range first.Cols[f] {
				if again.Cols[f][i] != v {
					t.Fatalf("feature %s row %d: %v, then %v", first.Names[f], i, v, again.Cols[f][i])
				}
			}
		}
	}
}

// TestMaxSamples: each tree's bootstrap holds MaxSamples draws (its leaves'
// counts sum to it), and a MaxSamples of the rows or more is the default
// forest, to the bit.
func TestMaxSamples(t *testing.T) {
	ds, _ := demo(t)
	n := ds.Rows()
	small, _, err := Grow(context.Background(), ds, Options{Trees: 5, Seed: 3, MaxSamples: n / 4})
	if err != nil {
		t.Fatal(err)
	}
	for tr := range small.NumTrees() {
		var tot int32
		for _, c := range small.Tree(tr).LeafCount {
			tot += c
		}
		if int(tot) != n/4 {
			t.Errorf("tree %d holds %d draws, want %d", tr, tot, n/4)
		}
	}
	all, _, _ := Grow(context.Background(), ds, Options{Trees: 5, Seed: 3})
	same, _, _ := Grow(context.Background(), ds, Options{Trees: 5, Seed: 3, MaxSamples: n + 10})
	x := make([]float64, len(ds.Names))
	for i := range ds.Rows() {
		x = ds.Row(i, x)
		if a, b := all.Predict(x, nil), same.Predict(x, nil); !slices.Equal(a, b) {
			t.Fatalf("row %d: %v against %v", i, a, b)
		}
	}
	if all.Nodes() <= small.Nodes() {
		t.Errorf("a quarter's bootstrap grew %d nodes, the whole %d", small.Nodes(), all.Nodes())
	}
}
