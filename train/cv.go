package train

import (
	"context"
	"fmt"
	"math/rand/v2"
	"slices"
)

// StratifiedFolds assigns each row a fold in [0, k) so that every class is
// spread over the folds as evenly as it can be (golearn's own cross-fold
// split is not stratified). Rows of a class are shuffled by the seed and
// dealt out in turn, each class starting where the last left off, so that
// fold sizes differ by at most one.
func StratifiedFolds(y []int32, classes, k int, seed uint64) []int {
	rng := rand.New(rand.NewPCG(seed, 0xf01d))
	fold := make([]int, len(y))
	next := 0
	for c := range classes {
		var rows []int
		for i, v := range y {
			if int(v) == c {
				rows = append(rows, i)
			}
		}
		rng.Shuffle(len(rows), func(i, j int) { rows[i], rows[j] = rows[j], rows[i] })
		for _, r := range rows {
			fold[r] = next
			next = (next + 1) % k
		}
	}
	return fold
}

// EvalOptions for CrossValidate.
type EvalOptions struct {
	Folds   int // default 5
	Seed    uint64
	Forest  Options
	Keepers []string // classes worth digging, for the dig-saving curve
	Hazards []string // classes never to be dug
	// Raw leaves the forest's probabilities unshrunk, for comparison with
	// other forests (scikit-learn's are raw).
	Raw bool
	// Progress, when set, is called with trees grown so far and in all.
	Progress func(done, total int)
}

// Evaluation is the cross-validated report. Its JSON is the evaluate
// command's contract.
type Evaluation struct {
	Model        Metrics    `json:"model"`
	Baseline     Metrics    `json:"baseline"`
	BaselineAxis string     `json:"baseline_axis"`
	DigSaving    *DigSaving `json:"dig_saving,omitempty"`
	Folds        int        `json:"folds"`
	Seed         uint64     `json:"seed"`
	Digs         int        `json:"digs"`
	Classes      []string   `json:"classes"`
	// Warnings are what the user must know about these figures: a small
	// history, thin classes, folds lowered to fit them.
	Warnings []string `json:"warnings"`
	// OneNumberVerdict is Verdict's sentence; empty when spade does better.
	OneNumberVerdict string `json:"one_number_verdict,omitempty"`
	// Screen is the ordnance screen's evaluation (EvaluateScreen), set by
	// the caller; nil when it was not made.
	Screen *ScreenEvaluation `json:"ordnance_screen"`
	// The pooled held-out probabilities, per row, for further analysis.
	Probs         [][]float64 `json:"-"`
	BaselineProbs [][]float64 `json:"-"`
}

// CrossValidate runs stratified k-fold cross-validation of the forest and of
// the single-number baseline on the same folds.
func CrossValidate(ctx context.Context, ds *Dataset, o EvalOptions) (*Evaluation, error) {
	if o.Folds == 0 {
		o.Folds = 5
	}
	n := ds.Rows()
	if o.Folds < 2 || o.Folds > n {
		return nil, fmt.Errorf("train: %d folds for %d digs: need 2 <= folds <= digs", o.Folds, n)
	}
	fo := o.Forest.withDefaults(len(ds.Names))
	K := len(ds.Classes)
	var warnings []string
	// Stratified folds need a dig of every class in every fold: with
	// fewer digs in the smallest class than folds, the folds are lowered to
	// its count (but not below 2) and the report says so.
	counts := ds.ClassCounts()
	least := slices.Min(counts)
	if least < o.Folds && o.Folds > 2 {
		was := o.Folds
		o.Folds = max(2, least)
		warnings = append(warnings, fmt.Sprintf("folds lowered from %d to %d: the smallest class has %d digs", was, o.Folds, least))
	}
	if least < 2 {
		warnings = append(warnings, "a class with a single dig cannot be both learnt and held out: its figures are those of a class the model never saw")
	}
	cc := map[string]int{}
	for k, n := range counts {
		cc[ds.Classes[k]] = n
	}
	warnings = append(warnings, HistoryNotes(n, cc)...)
	fold := StratifiedFolds(ds.Y, K, o.Folds, o.Seed)
	axis := BaselineAxis(ds.Names)
	ev := &Evaluation{Folds: o.Folds, Seed: o.Seed, Digs: n, Classes: ds.Classes, BaselineAxis: ds.Names[axis],
		Probs: make([][]float64, n), BaselineProbs: make([][]float64, n), Warnings: warnings}
	total := fo.Trees * o.Folds
	for k := range o.Folds {
		var trainIdx, testIdx []int
		for i, f := range fold {
			if f == k {
				testIdx = append(testIdx, i)
			} else {
				trainIdx = append(trainIdx, i)
			}
		}
		trainDS, testDS := ds.Subset(trainIdx), ds.Subset(testIdx)
		fopts := fo
		fopts.Seed = o.Seed + uint64(k+1)*0x9e3779b97f4a7c15
		if o.Progress != nil {
			base := k * fo.Trees
			fopts.Progress = func(done int) { o.Progress(base+done, total) }
		}
		forest, oob, err := Grow(ctx, trainDS, fopts)
		if err != nil {
			return nil, err
		}
		// The fold's shrinkage is fitted on its own training digs' out-of-bag
		// predictions, as a model of the whole history's is.
		shrink := FitShrinkage(trainDS.Y, oob, K)
		probs := forest.PredictDataset(testDS)
		if !o.Raw {
			for _, p := range probs {
				shrink.Apply(p)
			}
		}
		bl := FitBaseline(ds.Names[axis], trainDS.Cols[axis], trainDS.Y, K)
		for j, i := range testIdx {
			ev.Probs[i] = probs[j]
			ev.BaselineProbs[i] = slices.Clone(bl.Predict(ds.Cols[axis][i]))
		}
	}
	ev.Model = Score(ds.Classes, ds.Y, ev.Probs)
	ev.Baseline = Score(ds.Classes, ds.Y, ev.BaselineProbs)
	ev.OneNumberVerdict = ev.Verdict()
	if len(o.Keepers) > 0 {
		ev.DigSaving = digSaving(ds, o.Keepers, o.Hazards, ev.Probs, ev.BaselineProbs)
	}
	return ev, nil
}

// digSaving builds the model's and the baseline's curves on the same rows.
func digSaving(ds *Dataset, keepers, hazards []string, model, base [][]float64) *DigSaving {
	K := len(ds.Classes)
	isKeeper, isHazard := make([]bool, K), make([]bool, K)
	for k, c := range ds.Classes {
		isKeeper[k] = slices.Contains(keepers, c)
		isHazard[k] = slices.Contains(hazards, c)
	}
	n := ds.Rows()
	keeperRow, trashRow := make([]bool, n), make([]bool, n)
	ms, bs := make([]float64, n), make([]float64, n)
	d := &DigSaving{}
	for k, c := range ds.Classes {
		if isKeeper[k] {
			d.Keepers = append(d.Keepers, c)
		}
		if isHazard[k] {
			d.Hazards = append(d.Hazards, c)
		}
	}
	for i, y := range ds.Y {
		keeperRow[i] = isKeeper[y]
		trashRow[i] = !isKeeper[y] && !isHazard[y]
		if keeperRow[i] {
			d.KeeperDigs++
		} else if trashRow[i] {
			d.TrashDigs++
		}
		ms[i] = KeeperScore(model[i], isKeeper)
		bs[i] = KeeperScore(base[i], isKeeper)
	}
	d.Model = SavingCurve(ms, keeperRow, trashRow, SavingLevels)
	d.Baseline = SavingCurve(bs, keeperRow, trashRow, SavingLevels)
	return d
}

// Verdict is one plain sentence when the detector's own number does as
// well as spade or better on this log (by held-out log-loss, the measure
// that rewards honest probabilities): then spade's extra columns are not
// earning their keep here, and the user should know. Empty otherwise.
func (e *Evaluation) Verdict() string {
	if e.Model.LogLoss < e.Baseline.LogLoss && e.Model.Accuracy >= e.Baseline.Accuracy {
		return ""
	}
	return fmt.Sprintf("Verdict: on this log the one number (%s) does as well as spade or better (log-loss %.3f against spade's %.3f, accuracy %.3f against %.3f). Trust your detector's number here, and log more frequencies or more digs before leaning on spade.",
		e.BaselineAxis, e.Baseline.LogLoss, e.Model.LogLoss, e.Baseline.Accuracy, e.Model.Accuracy)
}
