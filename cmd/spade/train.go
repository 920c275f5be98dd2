package main

import (
	"bufio"
	"context"
	"fmt"

	"github.com/spade-detect/spade/internal/cli"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/textui"
	"github.com/spade-detect/spade/train"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

type trainOptions struct {
	in       labelledLogFlags
	format   formatFlag
	output   string
	trees    int
	seed     uint64
	samples  string
	noScreen bool
}

func (o *trainOptions) AddFlags(fs *pflag.FlagSet) {
	o.in.AddFlags(fs)
	o.format.AddFlags(fs, "table", "json")
	fs.StringVarP(&o.output, "output", "o", "", "write the model to `FILE` (required)")
	fs.IntVar(&o.trees, "trees", 200, "trees in the forest")
	fs.Uint64Var(&o.seed, "seed", 1, "random seed; the same seed and log give the same model file")
	fs.StringVar(&o.samples, "max-samples", "", "digs drawn for each tree: a count (`N`, such as 50000) or a fraction of the history (such as 0.2); default all of them. Smaller, faster trees for a very long history")
	fs.BoolVar(&o.noScreen, "no-screen", false, "leave out the ordnance screen (for comparison only: the model then warns of ordnance only from your own hazardous digs)")
}

func newTrainCommand(g *globalOptions) *cobra.Command {
	var opts trainOptions
	return withFlags(&cobra.Command{
		Use:   "train LOG -o MODEL",
		Short: "Learn a model from your dig history",
		Long: `train grows a random forest on your dig history (every reading with what came
out of the ground) and writes a model file: the feature spec and frequencies,
the classes, the forest, an out-of-bag summary, and the training digs' feature
vectors with id, class and date for the nearest-dig explanations, and the
ordnance screen: a second forest that tells spade's simulated munitions
(projectiles, mortar bombs, grenades, round shot and fuze bodies, read as your
instrument would read them at your frequencies, on your ground, at your noise
floor) from your own digs, so that the model warns of possible ordnance even
when your history holds none. With depth_cm in the log the screen also judges
by apparent size. The file holds no site names or coordinates. The file is written atomically: an interrupted
training never destroys the previous model.

train holds the whole log in memory, with the forest it grows: measured on
simulated logs, about 650 MB for 100,000 digs. For a very long history (a
club's pooled logs), --max-samples draws fewer digs for each tree (each
tree's bootstrap): smaller trees, faster to grow and to use, at some cost in
accuracy that the out-of-bag figures show.`,
		Example: "  spade train digs.csv -o my.spade\n  spade train digs.csv -o shapes.spade --label shape --trees 300 --skip-unlabelled",
		Args:    cobra.ExactArgs(1),
		RunE:    func(cmd *cobra.Command, args []string) error { return runTrain(cmd.Context(), g, opts, args) },
	}, &opts)
}

func runTrain(ctx context.Context, g *globalOptions, opts trainOptions, args []string) error {
	if err := cli.CheckOutputs(map[string]string{"-o": opts.output}, args[0]); err != nil {
		return err
	}
	if opts.output == "" {
		return usagef("train needs -o MODEL: where to write the model")
	}
	if opts.trees < 1 {
		return usagef("--trees must be at least 1")
	}
	if opts.output == "-" && textui.IsTerminal(g.stdout) {
		return usagef("-o - writes the model (binary) to standard output, which is a terminal here: give a file name, or pipe it")
	}
	if err := opts.format.check(); err != nil {
		return err
	}
	log, kind, err := opts.in.read(g, args[0])
	if err != nil {
		return err
	}
	samples, err := train.ParseMaxSamples(opts.samples, len(log.Digs))
	if err != nil {
		return usagef("--max-samples: %w", err)
	}
	spec := features.SpecOf(log)
	g.specNotes(spec)
	total := opts.trees // the progress bar's: the forest's trees, and the screen's
	if !opts.noScreen {
		total += train.ScreenTrees(log, train.ScreenOptions{})
	}
	bar := g.progress(total, "growing trees", opts.format.json())
	step := func(int) { bar.Step(1) }
	bundle, err := train.TrainBundle(ctx, log, spec, train.TrainOptions{
		Label: kind, Version: version, Skipped: len(log.Bad) + log.Unlabelled,
		Forest: train.Options{Trees: opts.trees, Seed: opts.seed, MaxSamples: samples, Progress: step},
		Screen: train.ScreenOptions{Progress: step}, NoScreen: opts.noScreen,
	})
	bar.Done()
	if err != nil {
		return err
	}
	classify.Prepare(bundle)
	if opts.output == "-" {
		// The model goes to standard output; the report, to stderr.
		bw := bufio.NewWriter(g.stdout)
		if err := bundle.Encode(bw); err != nil {
			return err
		}
		if err := bw.Flush(); err != nil {
			return err
		}
		g.stdout = g.stderr
	} else if err := bundle.SaveContext(ctx, opts.output); err != nil {
		return err
	}
	if opts.format.json() {
		return writeJSON(g.stdout, map[string]any{"model": opts.output, "summary": bundle.Summary, "classes": bundle.Classes, "freqs": spec.Freqs,
			"hazard_check": classify.HazardStatusOf(bundle), "warnings": train.Notes(bundle, log)})
	}
	s := bundle.Summary
	fmt.Fprintf(g.stdout, "Trained on %d digs, %d classes (%s), %d trees; wrote %s\n", s.Digs, len(bundle.Classes), kind, s.Trees, opts.output)
	fmt.Fprintf(g.stdout, "Out-of-bag: accuracy %.3f, balanced accuracy %.3f, log-loss %.3f\n", s.OutOfBag.Accuracy, s.OutOfBag.BalancedAccuracy, s.OutOfBag.LogLoss)
	fmt.Fprint(g.stdout, textui.Wrap(classify.HazardStatusOf(bundle).Text, 78, ""))
	for _, n := range train.Notes(bundle, log) {
		fmt.Fprint(g.stdout, textui.Wrap("note: "+n+".", 78, ""))
	}
	fmt.Fprintln(g.stdout, "For the full report next to the single-number baseline: spade evaluate LOG")
	return nil
}
