package main

import (
	"context"
	"errors"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// evaluateScreen measures the ordnance screen on the log: each library
// group held out from the screen's fit, and the user's digs out of bag. A
// log that cannot carry a screen gives nil, which the report states.
func evaluateScreen(ctx context.Context, g *globalOptions, log *features.Log, spec *features.FeatureSpec, seed uint64, vals *classify.Values, quiet bool) (*train.ScreenEvaluation, error) {
	var keeper func(*features.Dig) bool
	if vals != nil {
		keeper = func(d *features.Dig) bool { return vals.IsKeeper(d.Class(features.LabelBoth)) }
	}
	groups := len(datasets.MunitionGroups()) + 1
	bar := g.progress(groups*train.ScreenTrees(log, train.ScreenOptions{}), "testing the ordnance screen", quiet)
	ev, err := train.EvaluateScreen(ctx, log, spec, train.ScreenOptions{Seed: seed, Progress: func(int) { bar.Step(1) }}, keeper)
	bar.Done()
	if errors.Is(err, train.ErrNoScreen) {
		return nil, nil
	}
	return ev, err
}

// evaluateDataset cross-validates an extracted table, with a progress bar.
// vals nil means no keepers: no dig-saving figures.
func evaluateDataset(ctx context.Context, g *globalOptions, ds *train.Dataset, folds, trees int, seed uint64, vals *classify.Values, quiet bool, extra ...func(*train.EvalOptions)) (*train.Evaluation, error) {
	eo := train.EvalOptions{Folds: folds, Seed: seed, Forest: train.Options{Trees: trees}}
	for _, e := range extra {
		e(&eo)
	}
	if vals != nil {
		eo.Keepers, eo.Hazards = vals.Split(ds.Classes)
		if len(eo.Keepers) == 0 {
			g.note("note: no class counts as a keeper (worth more than a dig, or listed in keep): no dig-saving figures")
		}
	}
	rounds := 1
	if eo.LearningCurve {
		rounds = 4
	}
	if eo.BaselineOnly {
		rounds = 0
	}
	bar := g.progress(folds*trees*rounds, "cross-validating", quiet)
	// Called once a tree, from every tree-growing goroutine at once.
	eo.Progress = func(int, int) { bar.Step(1) }
	ev, err := train.CrossValidate(ctx, ds, eo)
	bar.Done()
	return ev, err
}
