package main

import (
	"context"
	"errors"
	"io"
	"path/filepath"

	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/report"
	"github.com/spade-detect/spade/train"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

type evaluateOptions struct {
	in      labelledLogFlags
	format  formatFlag
	values  valuesFlags
	folds   int
	trees   int
	seed    uint64
	output  string
	group   string
	noCurve bool
	report  string
}

func (o *evaluateOptions) AddFlags(fs *pflag.FlagSet) {
	o.in.AddFlags(fs)
	o.format.AddFlags(fs, "table", "json")
	o.values.AddFlags(fs)
	fs.IntVar(&o.folds, "folds", 5, "cross-validation folds")
	fs.IntVar(&o.trees, "trees", 200, "trees in each fold's forest")
	fs.Uint64Var(&o.seed, "seed", 1, "random seed for the folds and the forests")
	fs.StringVarP(&o.output, "output", "o", "-", "write the report to `FILE` (- is standard output)")
	fs.StringVar(&o.group, "group", "", "leave-group-out folds by `COLUMN`: site, date or month (whole groups held out together; honest when many digs come from one spot or day)")
	fs.BoolVar(&o.noCurve, "no-learning-curve", false, "leave out the learning curve (it grows forests on 25, 50 and 75% of each fold too)")
	fs.StringVar(&o.report, "report", "", "also write a season's report into `DIR`: a page (index.html) with its pictures, for a browser, offline")
}

func newEvaluateCommand(g *globalOptions) *cobra.Command {
	var opts evaluateOptions
	return withFlags(&cobra.Command{
		Use:   "evaluate LOG",
		Short: "Cross-validate on your history, next to the single-number baseline",
		Long: `evaluate says, honestly and in figures, how good a model of your history is:
stratified k-fold cross-validation of the forest and, on the same folds, of the
single-number baseline (your detector's display ID, or the phase at one
frequency, cut into bins with the class shares of each). It reports accuracy,
balanced accuracy, precision/recall/F1 per class, the commonest confusions,
log-loss, Brier score and calibration, and, with your keepers (--values or
--keep), the share of trash digs you could have skipped while keeping 95%, 99%
and 100% of keepers. Field classification programmes for buried munitions
report 70-95% of clutter left undug at full recovery of the items that matter;
read these figures against that, and remember they describe your past digs,
not a promise about the next one.

--report DIR also writes it all as a page, DIR/index.html, with pictures (dig
saving, learning curve, reliability, confusion, spectra, ambiguous ID ranges),
each with a line on how to read it. The page needs nothing but its folder.`,
		Example: "  spade evaluate digs.csv --values values.toml\n  spade evaluate digs.csv --values values.toml --report season/\n  spade evaluate digs.csv --keep gold,silver,coin --folds 10 --format json",
		Args:    cobra.ExactArgs(1),
		RunE:    func(cmd *cobra.Command, args []string) error { return runEvaluate(cmd.Context(), g, opts, args) },
	}, &opts)
}

// check refuses flags out of range before any reading.
func (o *evaluateOptions) check() error {
	if o.folds < 2 {
		return usagef("--folds must be at least 2")
	}
	if o.trees < 1 {
		return usagef("--trees must be at least 1, got %d", o.trees)
	}
	return nil
}

func runEvaluate(ctx context.Context, g *globalOptions, opts evaluateOptions, args []string) error {
	if err := report.PrepareFolder(opts.report, map[string]string{"-o": opts.output}, args[0], opts.values.file); err != nil {
		return err
	}
	h, err := g.readHistory(&opts.in, &opts.values, &opts.format, opts.check, map[string]string{"-o": opts.output}, args[0])
	if err != nil {
		return err
	}
	groups, err := train.GroupsOf(h.log, opts.group)
	if errors.Is(err, train.ErrGroupBy) {
		return usagef("--group: %w", err)
	} else if err != nil {
		return err
	}
	ev, err := evaluateDataset(ctx, g, h.ds, opts.folds, opts.trees, opts.seed, h.vals, opts.format.json(), func(eo *train.EvalOptions) {
		eo.Groups, eo.LearningCurve, eo.BaselineOnly = groups, !opts.noCurve, h.log.DisplayIDOnly
	})
	if err != nil {
		return err
	}
	ev.GroupedBy = opts.group
	ev.Warnings = append(ev.Warnings, features.LabelNotes(h.log.Digs)...)
	if h.spec != nil {
		if ev.Screen, err = evaluateScreen(ctx, g, h.log, h.spec, opts.seed, h.vals, opts.format.json()); err != nil {
			return err
		}
	}
	if opts.report != "" {
		season, err := report.NewSeason(h.log, h.ds, ev, h.vals)
		if err != nil {
			return err
		}
		if _, err := report.WriteHTML(ctx, opts.report, season, report.Meta{LogName: args[0], Date: report.Today(), Version: versionString()}); err != nil {
			return err
		}
		defer g.note("wrote %s", filepath.Join(opts.report, report.PageFile))
	}
	return g.writeOutput(opts.output, func(w io.Writer) error {
		if opts.format.json() {
			return writeJSON(w, ev)
		}
		report.WriteEvaluation(w, ev, string(h.kind))
		if ev.Screen == nil && !ev.BaselineOnly {
			report.WriteScreen(w, nil)
		}
		return nil
	})
}
