package train

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"slices"
	"strings"

	"github.com/spade-detect/spade/features"
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
	// Groups, when set, gives each row a group (a site, a day): folds then
	// hold whole groups, so that no fold is tested on digs from a spot or
	// a day it also learnt from.
	Groups []string
	// LearningCurve adds the held-out figures of forests grown on 25, 50
	// and 75 % of each fold's training digs.
	LearningCurve bool
	// Raw leaves the forest's probabilities unshrunk, for comparison with
	// other forests (scikit-learn's are raw).
	Raw bool
	// BaselineOnly measures the single-number baseline alone, for a log of
	// display IDs only: no forest is grown.
	BaselineOnly bool
	// Progress, when set, is called with trees grown so far and in all.
	Progress func(done, total int)
}

// DisplayIDOnlyNote is what an evaluation of a log of display IDs only
// says about what it lacks.
const DisplayIDOnlyNote = "this log has display IDs only, so these are the figures of the one number alone; log phase and amplitude at two or more frequencies (README: getting readings out of an instrument) and spade adds its model, its probabilities per class and the ordnance screen"

// Evaluation is the cross-validated report. Its JSON is the evaluate
// command's contract.
type Evaluation struct {
	// Model is the forest's figures; zero, and left out of the JSON, when
	// only the baseline was measured (BaselineOnly).
	Model        Metrics    `json:"model,omitzero"`
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
	// GroupedBy names what the folds were grouped by; empty for stratified.
	GroupedBy string `json:"grouped_by,omitempty"`
	// Learning is the learning curve, when asked for: accuracy and
	// log-loss against the share of the history learnt from.
	Learning []LearningPoint `json:"learning_curve,omitempty"`
	// LearningVerdict says in one sentence whether more digs would help.
	LearningVerdict string `json:"learning_verdict,omitempty"`
	// OneNumberVerdict is Verdict's sentence; empty when spade does better.
	OneNumberVerdict string `json:"one_number_verdict,omitempty"`
	// Screen is the ordnance screen's evaluation (EvaluateScreen), set by
	// the caller; nil when it was not made.
	Screen *ScreenEvaluation `json:"ordnance_screen"`
	// BaselineOnly is set when the log has display IDs only: the forest is
	// not grown, and the figures are the single number's alone.
	BaselineOnly bool `json:"baseline_only,omitempty"`
	// The pooled held-out probabilities, per row, for further analysis.
	Probs         [][]float64 `json:"-"`
	BaselineProbs [][]float64 `json:"-"`
}

// foldsFor assigns each row its fold: whole groups when o.Groups is set,
// else stratified. Stratified folds need a dig of every class in every
// fold, so with fewer digs in the smallest class than folds the folds are
// lowered to its count (but not below 2). The warnings say so, and what
// HistoryNotes says of the history.
func foldsFor(ds *Dataset, o EvalOptions) (fold []int, folds int, warnings []string, err error) {
	n := ds.Rows()
	counts := ds.ClassCounts()
	cc := map[string]int{}
	for k, c := range counts {
		cc[ds.Classes[k]] = c
	}
	if o.Groups != nil {
		if len(o.Groups) != n {
			panic("train: length mismatch")
		}
		if fold, folds, err = GroupFolds(o.Groups, o.Folds); err != nil {
			return nil, 0, nil, err
		}
		return fold, folds, HistoryNotes(n, cc), nil
	}
	folds = o.Folds
	if least := slices.Min(counts); least < folds && folds > 2 {
		folds = max(2, least)
		warnings = append(warnings, fmt.Sprintf("folds lowered from %d to %d: the smallest class has %s", o.Folds, folds, features.Plural(least, "dig")))
	}
	if slices.Min(counts) < 2 {
		warnings = append(warnings, "a class with a single dig cannot be both learnt and held out: its figures are those of a class the model never saw")
	}
	warnings = append(warnings, HistoryNotes(n, cc)...)
	return StratifiedFolds(ds.Y, len(ds.Classes), folds, o.Seed), folds, warnings, nil
}

// CrossValidate runs stratified k-fold cross-validation of the forest and of
// the single-number baseline on the same folds.
func CrossValidate(ctx context.Context, ds *Dataset, o EvalOptions) (*Evaluation, error) {
	if o.Folds == 0 {
		o.Folds = 5
	}
	n := ds.Rows()
	if o.Folds < 2 || o.Folds > n {
		return nil, fmt.Errorf("%d folds for %d digs: need 2 <= folds <= digs", o.Folds, n)
	}
	fo := o.Forest.withDefaults(len(ds.Names))
	K := len(ds.Classes)
	fold, folds, warnings, err := foldsFor(ds, o)
	if err != nil {
		return nil, err
	}
	o.Folds = folds
	axis := BaselineAxis(ds.Names)
	ev := &Evaluation{Folds: o.Folds, Seed: o.Seed, Digs: n, Classes: ds.Classes, BaselineAxis: ds.Names[axis],
		Probs: make([][]float64, n), BaselineProbs: make([][]float64, n), Warnings: warnings}
	fractions := []float64{1}
	if o.BaselineOnly {
		fractions, o.LearningCurve, ev.BaselineOnly = nil, false, true
		ev.Probs = nil
		ev.Warnings = append(ev.Warnings, DisplayIDOnlyNote)
	}
	if o.LearningCurve {
		fractions = []float64{0.25, 0.5, 0.75, 1}
	}
	curve := make([][][]float64, len(fractions))
	for j := range curve {
		curve[j] = make([][]float64, n)
	}
	trainSizes := make([]int, len(fractions))
	total := fo.Trees * o.Folds * len(fractions)
	step := 0
	for k := range o.Folds {
		trainIdx, testIdx := foldRows(fold, k)
		testDS := ds.Subset(testIdx)
		// A seeded order of the fold's training digs: each share of the
		// learning curve learns from the first part of it.
		perm := rand.New(rand.NewPCG(o.Seed, uint64(k)+0x1ea7)).Perm(len(trainIdx))
		var probs [][]float64
		var trainDS *Dataset
		for j, frac := range fractions {
			sub := learningShare(trainIdx, perm, frac)
			trainDS = ds.Subset(sub)
			trainSizes[j] += len(sub)
			fopts := fo
			fopts.Seed = o.Seed + uint64(k+1)*0x9e3779b97f4a7c15
			if o.Progress != nil {
				base := step * fo.Trees
				fopts.Progress = func(done int) { o.Progress(base+done, total) }
			}
			step++
			if probs, err = heldOutProbs(ctx, trainDS, testDS, fopts, !o.Raw); err != nil {
				return nil, err
			}
			for q, i := range testIdx {
				curve[j][i] = probs[q]
			}
		}
		if trainDS == nil { // BaselineOnly: no forest was grown
			trainDS = ds.Subset(trainIdx)
		}
		bl := FitBaseline(ds.Names[axis], trainDS.Cols[axis], trainDS.Y, K)
		for j, i := range testIdx {
			if ev.Probs != nil {
				ev.Probs[i] = probs[j]
			}
			ev.BaselineProbs[i] = slices.Clone(bl.Predict(ds.Cols[axis][i]))
		}
	}
	ev.Baseline = Score(ds.Classes, ds.Y, ev.BaselineProbs)
	if !ev.BaselineOnly {
		ev.Model = Score(ds.Classes, ds.Y, ev.Probs)
		ev.OneNumberVerdict = ev.Verdict()
	}
	if o.LearningCurve {
		for j, frac := range fractions {
			m := Score(ds.Classes, ds.Y, curve[j])
			ev.Learning = append(ev.Learning, LearningPoint{Share: frac, Digs: trainSizes[j] / o.Folds, Accuracy: m.Accuracy, LogLoss: m.LogLoss})
		}
		ev.LearningVerdict = learningVerdict(ev.Learning)
	}
	if len(o.Keepers) > 0 {
		ev.DigSaving = SavingCurves(ds, o.Keepers, o.Hazards, ev.Probs, ev.BaselineProbs, SavingLevels)
	}
	return ev, nil
}

// foldRows are the rows fold k learns from and is tested on.
func foldRows(fold []int, k int) (trainIdx, testIdx []int) {
	for i, f := range fold {
		if f == k {
			testIdx = append(testIdx, i)
		} else {
			trainIdx = append(trainIdx, i)
		}
	}
	return trainIdx, testIdx
}

// learningShare is the first frac of a fold's training rows in the seeded
// order perm (at least 2), in row order; all of them for frac 1.
func learningShare(trainIdx, perm []int, frac float64) []int {
	if frac >= 1 {
		return trainIdx
	}
	m := max(2, int(frac*float64(len(trainIdx))))
	sub := make([]int, m)
	for q := range m {
		sub[q] = trainIdx[perm[q]]
	}
	slices.Sort(sub)
	return sub
}

// heldOutProbs grows a forest on trainDS and predicts testDS, shrunk (when
// shrink) by a shrinkage fitted on the training digs' own out-of-bag
// predictions, as a model of the whole history's is.
func heldOutProbs(ctx context.Context, trainDS, testDS *Dataset, fopts Options, shrink bool) ([][]float64, error) {
	forest, oob, err := Grow(ctx, trainDS, fopts)
	if err != nil {
		return nil, err
	}
	probs := forest.PredictDataset(testDS)
	if shrink {
		s := FitShrinkage(trainDS.Y, oob, len(trainDS.Classes))
		for _, p := range probs {
			s.Apply(p)
		}
	}
	return probs, nil
}

// SavingCurves builds the model's and the baseline's dig-saving curves on
// the same rows of ds, from their held-out probabilities (model nil: the
// baseline's alone), at the keeper shares levels (SavingLevels for the
// report's figures; a fine grid to draw the whole curve).
func SavingCurves(ds *Dataset, keepers, hazards []string, model, base [][]float64, levels []float64) *DigSaving {
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
		if model != nil {
			ms[i] = KeeperScore(model[i], isKeeper)
		}
		bs[i] = KeeperScore(base[i], isKeeper)
	}
	if model != nil {
		d.Model = SavingCurve(ms, keeperRow, trashRow, levels)
	}
	d.Baseline = SavingCurve(bs, keeperRow, trashRow, levels)
	return d
}

// Verdict is one plain sentence when the detector's own number does as
// well as spade or better on this log (by held-out log-loss, the measure
// that rewards honest probabilities): then spade's extra columns are not
// earning their keep here, and the user should know. Empty otherwise.
func (e *Evaluation) Verdict() string {
	if e.BaselineOnly {
		return ""
	}
	if e.Model.LogLoss < e.Baseline.LogLoss && e.Model.Accuracy >= e.Baseline.Accuracy {
		return ""
	}
	return fmt.Sprintf("Verdict: on this log the one number (%s) does as well as spade or better (log-loss %.3f against spade's %.3f, accuracy %.3f against %.3f). Trust your detector's number here, and log more frequencies or more digs before leaning on spade.",
		e.BaselineAxis, e.Baseline.LogLoss, e.Model.LogLoss, e.Baseline.Accuracy, e.Model.Accuracy)
}

// LearningPoint is one point of the learning curve.
type LearningPoint struct {
	Share    float64 `json:"share"` // of each fold's training digs
	Digs     int     `json:"digs"`  // mean training digs per fold
	Accuracy float64 `json:"accuracy"`
	LogLoss  float64 `json:"log_loss"`
}

// learningVerdict reads the last step of the curve: a log-loss still
// falling by more than 0.02 from 75 % to all of the history means more
// digs would still help (a threshold of ours, about the spread between
// seeds on the demo history).
func learningVerdict(c []LearningPoint) string {
	if len(c) < 2 {
		return ""
	}
	a, b := c[len(c)-2], c[len(c)-1]
	if a.LogLoss-b.LogLoss > 0.02 || b.Accuracy-a.Accuracy > 0.01 {
		return fmt.Sprintf("More digs would still help: from %d to %d digs the log-loss went from %.3f to %.3f and accuracy from %.3f to %.3f.", a.Digs, b.Digs, a.LogLoss, b.LogLoss, a.Accuracy, b.Accuracy)
	}
	return fmt.Sprintf("It has levelled off: from %d to %d digs the log-loss went from %.3f to %.3f and accuracy from %.3f to %.3f. More digs of the same kinds add little; digs the model is unsure of (classify marks them) may still.", a.Digs, b.Digs, a.LogLoss, b.LogLoss, a.Accuracy, b.Accuracy)
}

// GroupFolds assigns whole groups to folds: the groups, largest first (ties
// by name), each to the fold with the fewest rows so far. With fewer
// groups than folds, there is a fold per group. At least two groups are
// needed.
func GroupFolds(groups []string, k int) ([]int, int, error) {
	size := map[string]int{}
	for _, g := range groups {
		size[g]++
	}
	if len(size) < 2 {
		return nil, 0, fmt.Errorf("leave-group-out needs at least two groups, the log has %d", len(size))
	}
	names := make([]string, 0, len(size))
	for g := range size {
		names = append(names, g)
	}
	slices.SortFunc(names, func(a, b string) int {
		if size[a] != size[b] {
			return size[b] - size[a]
		}
		return strings.Compare(a, b)
	})
	k = min(k, len(names))
	load := make([]int, k)
	of := map[string]int{}
	for _, g := range names {
		f := slices.Index(load, slices.Min(load))
		of[g] = f
		load[f] += size[g]
	}
	fold := make([]int, len(groups))
	for i, g := range groups {
		fold[i] = of[g]
	}
	return fold, k, nil
}

// ErrGroupBy is GroupsOf's refusal of an unknown grouping.
var ErrGroupBy = errors.New("want site, date or month")

// GroupsOf is each dig's group for leave-group-out folds (EvalOptions
// Groups) by its site, date, or month ("" for none: nil). A dig without
// the column asked for is a *features.ParseError at its line.
func GroupsOf(log *features.Log, by string) ([]string, error) {
	if by == "" {
		return nil, nil
	}
	column := map[string]string{"site": "site", "date": "date", "month": "date"}[by]
	if column == "" {
		return nil, fmt.Errorf("%w, got %q", ErrGroupBy, by)
	}
	groups := make([]string, len(log.Digs))
	for i := range log.Digs {
		d := &log.Digs[i]
		g := d.Date
		switch by {
		case "site":
			g = d.Site
		case "month":
			g = d.Date[:min(7, len(d.Date))]
		}
		if g == "" {
			return nil, &features.ParseError{File: log.Name, Line: d.Line, Column: column, Err: fmt.Errorf("%w: --group %s needs a %s on every row", features.ErrMissingValue, by, column)}
		}
		groups[i] = g
	}
	return groups, nil
}
