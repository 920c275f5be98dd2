package train

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/spade-detect/spade/features"
)

// TrainOptions for TrainBundle.
type TrainOptions struct {
	Label   features.Label
	Forest  Options
	Version string // spade's version, recorded in the model
	Skipped int    // rows the reader skipped, recorded in the summary
	// Screen configures the ordnance screen; NoScreen leaves it out (for
	// cross-validation folds, which do not need one).
	Screen   ScreenOptions
	NoScreen bool
}

// TrainBundle grows a forest on a labelled log and assembles the model
// bundle: spec, classes, summary with out-of-bag figures, the single-number
// baseline fitted on all digs, and the training digs' vectors (no sites).
func TrainBundle(ctx context.Context, log *features.Log, spec *features.FeatureSpec, o TrainOptions) (*Bundle, error) {
	if o.Label == "" {
		o.Label = features.LabelBoth
	}
	ds, err := FromLog(log, spec, o.Label)
	if err != nil {
		return nil, err
	}
	b, err := TrainDataset(ctx, ds, spec, o)
	if err != nil || o.NoScreen {
		return b, err
	}
	if o.Screen.Seed == 0 {
		o.Screen.Seed = o.Forest.Seed
	}
	return b, b.AddScreen(ctx, log, o.Screen)
}

// AddScreen fits the ordnance screen to the log the bundle was trained on.
// A history that cannot carry one (ErrNoScreen) leaves the bundle without
// a screen, which every view of it then says; any other error is returned.
func (b *Bundle) AddScreen(ctx context.Context, log *features.Log, o ScreenOptions) error {
	s, err := TrainScreen(ctx, log, b.Spec, o)
	if errors.Is(err, ErrNoScreen) {
		b.Screen = nil
		b.Summary.NoScreen = err.Error()
		return nil
	}
	if err != nil {
		return err
	}
	b.Screen = s
	return nil
}

// TrainDataset is TrainBundle on an extracted table.
func TrainDataset(ctx context.Context, ds *Dataset, spec *features.FeatureSpec, o TrainOptions) (*Bundle, error) {
	if len(ds.Classes) < 2 {
		return nil, fmt.Errorf("%w: the history has only %s; label the trash you dig too", ErrTooFewClasses, strings.Join(ds.Classes, ""))
	}
	fo := o.Forest.withDefaults(len(ds.Names))
	forest, oob, err := Grow(ctx, ds, fo)
	if err != nil {
		return nil, err
	}
	K := len(ds.Classes)
	shrink := FitShrinkage(ds.Y, oob, K)
	x := make([]float64, len(ds.Names))
	for i := range oob {
		if math.IsNaN(oob[i][0]) {
			// Every tree saw this dig (rare beyond a few trees): its in-bag
			// prediction stands in, so the stored figures stay finite.
			x = ds.Row(i, x)
			oob[i] = forest.Predict(x, nil)
		}
		shrink.Apply(oob[i])
	}
	summary := Summary{
		SpadeVersion: o.Version, LatestDig: latestDate(ds.Dates), Seed: fo.Seed,
		Trees: fo.Trees, Mtry: forest.Mtry, Digs: ds.Rows(), ClassCounts: map[string]int{},
		OutOfBag: Score(ds.Classes, ds.Y, oob), Importance: map[string]float64{}, Skipped: o.Skipped,
	}
	if m := fo.Samples(ds.Rows()); m < ds.Rows() {
		summary.MaxSamples = m
	}
	for k, c := range ds.ClassCounts() {
		summary.ClassCounts[ds.Classes[k]] = c
	}
	for i, n := range ds.Names {
		summary.Importance[n] = forest.Importance[i]
	}
	tr := Training{IDs: ds.IDs, Dates: ds.Dates, Y: ds.Y, Vectors: make([][]float64, ds.Rows()), OutOfBag: oob}
	if tr.IDs == nil {
		tr.IDs, tr.Dates = make([]string, ds.Rows()), make([]string, ds.Rows())
	}
	for i := range ds.Rows() {
		tr.Vectors[i] = ds.Row(i, nil)
	}
	axis := BaselineAxis(ds.Names)
	return &Bundle{
		Spec: spec, Label: o.Label, Classes: ds.Classes, Summary: summary,
		Baseline: FitBaseline(ds.Names[axis], ds.Cols[axis], ds.Y, K),
		Training: tr, Forest: forest, Shrinkage: &shrink,
	}, nil
}

// latestDate is the last of the digs' dates (YYYY-MM-DD sorts as text), or
// "" when none has one. The model carries it instead of the day it was
// made, so the same seed and data give the same bytes on any day.
func latestDate(dates []string) string {
	latest := ""
	for _, d := range dates {
		latest = max(latest, d)
	}
	return latest
}
