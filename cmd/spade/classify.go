package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"runtime/debug"

	"github.com/spade-detect/spade/internal/cli"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/textui"
	"github.com/spade-detect/spade/train"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

type classifyOptions struct {
	log     logOptions
	format  formatFlag
	values  valuesFlags
	model   string
	reading string
	top     int
	output  string
}

func (o *classifyOptions) AddFlags(fs *pflag.FlagSet) {
	o.log.AddFlags(fs)
	o.format.AddFlags(fs, "table", "json", "csv")
	o.values.AddFlags(fs)
	fs.StringVar(&o.model, "model", "", "the model file from spade train (required)")
	fs.StringVarP(&o.reading, "reading", "r", "", `one reading typed inline: "4.3k=111.8/0.10, 21.7k=147.5/0.23, id=60"`)
	fs.IntVar(&o.top, "top", 5, "classes shown per reading in the table")
	fs.StringVarP(&o.output, "output", "o", "-", "write the results to `FILE` (- is standard output)")
}

func newClassifyCommand(g *globalOptions) *cobra.Command {
	var opts classifyOptions
	return withFlags(&cobra.Command{
		Use:   "classify --model MODEL [READINGS|-]",
		Short: "Give class probabilities, nearest past digs and a dig decision for new readings",
		Long: `classify reads new readings (a dig-log file in CSV or JSON Lines, - for standard
input, or one reading typed with --reading) and gives for each: the probability
of every class, sorted, with marginals per material and per shape; the nearest
past digs in your history; a novelty score (a percentile of your own digs'
scores; above the 99th the reading is unfamiliar and its probabilities are not
to be trusted); and the dig decision by your values file.

Every reading gets a hazard check, and its caution comes first in every view.
It has two tiers. "Likely ordnance": do not dig, do not touch, mark the spot and
report it to the police or the authorities. "Cannot be ruled out": do not dig
until you have looked into the site's history and the signal; when in doubt,
report it. The check draws on the model's ordnance screen (spade's simulated
munitions, fitted to your instrument and ground, so that it warns even when
your history holds no ordnance; it uses depth_cm when a reading has one) and
on your history's own hazardous classes (by default any shape "ordnance") at
1% (or the values file's hazard_threshold). Such a reading is never called
safe, and an unfamiliar one is "unsure". A model that cannot warn says so in
every view. A probability is never a guarantee.

Inline readings: HZ=PHASE/AMP per frequency, separated by commas or spaces;
id=N adds the display ID, depth=CM the depth (the ordnance screen then judges
by apparent size), gHZ=PHASE/AMP a bare-ground reading beside the target.
Files of any size stream through in constant memory (the model's forests and
index, 85 MB at 100,000 digs, and some 20 MB more); ids need not be unique.
The model file is read in place while classify runs: replace it by renaming.
On a bad row (without --skip-bad) every reading before it is classified and
written, in order, then the run stops with the row's error and exit 1.`,
		Example: "  spade classify --model my.spade new.csv\n" +
			"  spade classify --model my.spade --values values.toml --format json new.jsonl\n" +
			"  spade classify --model my.spade -r \"4.3k=111.8/0.10, 9.7k=129.0/0.17, 21.7k=147.5/0.23, 36.3k=163.2/0.26, id=60\"",
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error { return runClassify(cmd.Context(), g, opts, args) },
	}, &opts)
}

func runClassify(ctx context.Context, g *globalOptions, opts classifyOptions, args []string) error {
	if err := cli.CheckOutputs(map[string]string{"-o": opts.output}, append([]string{opts.model, opts.values.file}, args...)...); err != nil {
		return err
	}
	if err := opts.format.check(); err != nil {
		return err
	}
	if opts.model == "" {
		return usagef("classify needs --model MODEL (from spade train)")
	}
	switch {
	case opts.reading == "" && len(args) == 0:
		return usagef("give a readings file, - for standard input, or --reading")
	case opts.reading != "" && len(args) > 0:
		return usagef("give a readings file or --reading, not both")
	case opts.top < 1:
		return usagef("--top must be at least 1, got %d", opts.top)
	}
	// classify needs no out-of-bag rows (10 MB at 100,000 digs) and the
	// training vectors only whitened (format 5 stores them so, indexed):
	// the file is mapped, and the rest of it never read (train.LoadOptions).
	bundle, err := train.LoadWith(opts.model, train.LoadOptions{NoOutOfBag: true, Whitened: true, Mapped: true})
	if err != nil {
		return err
	}
	vals, err := opts.values.load()
	if err != nil {
		return err
	}
	if err := opts.values.check(vals, bundle.Classes, bundle.Label); err != nil {
		return err
	}
	c := classify.New(bundle, vals)
	// The garbage collector runs at a quarter of the live heap over it (not
	// the whole), so that a long run stays near what it keeps: at 100,000
	// digs a 10,000-reading run peaked at 180 MB, 120 with this.
	debug.SetGCPercent(25)
	next, name, closer, err := readingSource(g, opts, args)
	if err != nil {
		return err
	}
	defer closer()
	// A count on stderr while results go to a file or a pipe; never over a
	// table being written to the same screen.
	toScreen := (opts.output == "-" || opts.output == "") && textui.IsTerminal(g.stdout)
	bar := g.progress(-1, "classifying", opts.format.json() || toScreen || opts.reading != "")
	defer bar.Done()
	return g.writeOutput(opts.output, func(w io.Writer) error {
		out := newResultWriter(w, opts.format.value, bundle.Classes, opts.top, c.Warnings())
		n, err := classify.StreamTo(ctx, c, next, name, out, func() { bar.Step(1) })
		var pe *features.ParseError
		if err != nil && n > 0 && errors.As(err, &pe) {
			// A bad row: every result before it is written, and the run
			// still fails on it.
			return cli.KeepOutput{Err: fmt.Errorf("%w (the results of the %s before it are written)", err, features.Plural(n, "reading"))}
		}
		return err
	})
}
