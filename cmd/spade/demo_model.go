package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/textui"
	"github.com/spade-detect/spade/train"
)

// demoReadings trains a model of the whole history, with its screen,
// saves it to modelPath, and classifies the demo's readings, each with
// what it really was.
func demoReadings(ctx context.Context, g *globalOptions, w io.Writer, log *features.Log, vals *classify.Values, opts demoOptions, modelPath string) error {
	bar := g.progress(opts.trees+train.ScreenTrees(log, train.ScreenOptions{}), "growing trees", false)
	step := func(int) { bar.Step(1) }
	bundle, err := train.TrainBundle(ctx, log, features.SpecOf(log), train.TrainOptions{Label: features.LabelBoth, Version: version,
		Forest: train.Options{Trees: opts.trees, Seed: opts.seed, Progress: step}, Screen: train.ScreenOptions{Progress: step}})
	bar.Done()
	if err != nil {
		return err
	}
	classify.Prepare(bundle)
	fmt.Fprint(w, textui.Wrap(classify.HazardStatusOf(bundle).Text+" The readings below have no depth, so the screen judges them by phase and amplitude and says at most \"cannot be ruled out\"; the history's own ordnance digs give the \"likely\" tier.", 78, ""))
	fmt.Fprintln(w)
	if err := bundle.SaveContext(ctx, modelPath); err != nil {
		return fmt.Errorf("demo: %w", err)
	}
	readings, err := features.ReadLog(bytes.NewReader(datasets.DemoReadings), datasets.DemoReadingsName, features.ReadOptions{})
	if err != nil {
		return err
	}
	notes := datasets.DemoReadingNotes()
	c := classify.New(bundle, vals)
	for i := range readings.Digs {
		r, err := c.Classify(&readings.Digs[i])
		if err != nil {
			return err
		}
		classify.WriteTable(w, r, 4)
		if n := notes[r.Dig]; n != "" {
			fmt.Fprint(w, textui.Wrap("(what it really was: "+strings.TrimPrefix(n, "simulated: ")+")", 78, "     "))
		}
	}
	return nil
}
