package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/report"
	"github.com/spade-detect/spade/internal/textui"
	"github.com/spade-detect/spade/train"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

type demoOptions struct {
	dir   string
	trees int
	seed  uint64
}

func (o *demoOptions) AddFlags(fs *pflag.FlagSet) {
	fs.StringVarP(&o.dir, "output", "o", "spade-demo", "the `DIR` the demo writes its model and plots into (nothing is written elsewhere)")
	fs.IntVar(&o.trees, "trees", 200, "trees in the forest")
	fs.Uint64Var(&o.seed, "seed", 1, "random seed")
}

func newDemoCommand(g *globalOptions) *cobra.Command {
	var opts demoOptions
	return withFlags(&cobra.Command{
		Use:   "demo",
		Short: "Run the whole job on the embedded, invented demo dig history",
		Long: `demo runs spade end to end on an invented history of 1500 digs from two
invented sites (Harrowmere Farm, an iron-rich inland field, and Sandle Reach, a
tidal beach), simulated by spade's own physics models at 4.3, 9.7, 21.7 and 36.3 kHz:
it trains a model, prints the cross-validated report next to the single-number
baseline with the dig-saving figures, shows the ambiguous display-ID ranges,
classifies twelve example readings (one of them possible ordnance, one unlike
anything in the history), and writes the model and plots into a folder.`,
		Example: "  spade demo\n  spade demo -o /tmp/demo --trees 100",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, args []string) error { return runDemo(cmd.Context(), g, opts) },
	}, &opts)
}

func runDemo(ctx context.Context, g *globalOptions, opts demoOptions) error {
	if opts.trees < 1 {
		return usagef("--trees must be at least 1")
	}
	w := g.stdout
	log, err := datasets.DemoLog()
	if err != nil {
		return err
	}
	vals, err := classify.ParseValues("demo/values.toml", string(datasets.DemoValues))
	if err != nil {
		return err
	}
	if err := os.MkdirAll(opts.dir, 0o755); err != nil {
		return fmt.Errorf("demo: %w", err)
	}
	fmt.Fprintf(w, "spade demo: the main job on an invented dig history\n\n")
	fmt.Fprint(w, textui.Wrap(fmt.Sprintf("History: %d digs from two invented sites, Harrowmere Farm (an iron-rich field) and Sandle Reach (a tidal beach), read at %s, each with what came out of the ground. Values: datasets/demo/values.toml.",
		len(log.Digs), features.HzList(log.Freqs)), 78, ""))

	// 1. How good is it, honestly?
	fmt.Fprintf(w, "\n== 1. How good is it? Cross-validated, next to the single number\n\n")
	// One extraction serves the evaluation, the overlap and the model.
	ds, err := train.FromLog(log, features.SpecOf(log), features.LabelBoth)
	if err != nil {
		return err
	}
	ev, err := evaluateDataset(ctx, g, ds, 5, opts.trees, opts.seed, vals, false)
	if err != nil {
		return err
	}
	report.WriteEvaluation(w, ev, string(features.LabelBoth))

	// 2. Which ranges are ambiguous?
	fmt.Fprintf(w, "\n== 2. Which display IDs could be anything on this ground?\n\n")
	season, err := report.NewSeason(log, ds, ev, vals)
	if err != nil {
		return err
	}
	season.Overlap.WriteTable(w, true)

	// 3. A model, and new readings.
	fmt.Fprintf(w, "\n== 3. New readings, classified by a model of the whole history\n\n")
	modelPath := filepath.Join(opts.dir, "demo.spade")
	if err := demoReadings(ctx, g, w, log, vals, opts, modelPath); err != nil {
		return err
	}

	// 4. Pictures.
	pictures, err := report.WritePictures(opts.dir, season.Pictures(report.PictureOverlap, report.PictureReliability, report.PictureConfusion, report.PictureSpectra))
	if err != nil {
		return fmt.Errorf("demo: %w", err)
	}
	fmt.Fprintf(w, "\n== 4. Written into %s\n\n", opts.dir)
	for _, p := range append([]string{modelPath}, pictures...) {
		fmt.Fprintf(w, "  %s\n", p)
	}
	fmt.Fprint(w, "\n"+textui.WrapHanging("", "Your own log next: spade evaluate LOG --values V --report DIR writes a season's report for a browser; spade train LOG -o my.spade, then spade classify --model my.spade READINGS (see the README for the log format).", 80, ""))
	fmt.Fprint(w, "\n"+textui.WrapHanging("", classify.Safety, 80, ""))
	return nil
}
