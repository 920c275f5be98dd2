package main

import (
	"context"
	"io"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/classify/overlap"
	"github.com/spade-detect/spade/classify/plots"
	"github.com/spade-detect/spade/internal/report"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

type overlapOptions struct {
	in         labelledLogFlags
	format     formatFlag
	values     valuesFlags
	model      string
	by         string
	bin        float64
	minTop     float64
	maxEntropy float64
	plot       string
	seed       uint64
	trees      int
	output     string
}

func (o *overlapOptions) AddFlags(fs *pflag.FlagSet) {
	o.in.AddFlags(fs)
	o.format.AddFlags(fs, "table", "json", "csv")
	o.values.AddFlags(fs)
	fs.StringVar(&o.model, "model", "", "use this model's out-of-bag probabilities instead of cross-validating (digs matched by id, readings and class; a model of another log whose ids collide is refused)")
	fs.StringVar(&o.by, "by", "", "the single-number axis: display_id or phase_<hz> (default: display_id when the log has it)")
	fs.Float64Var(&o.bin, "bin", 0, "bin width in the axis's units (default: about 30 digs a bin and at least 10 bins, rounded)")
	fs.Float64Var(&o.minTop, "min-top-share", 0.8, "a bin is ambiguous when its top class has less than this share")
	fs.Float64Var(&o.maxEntropy, "max-entropy", 1, "or when its entropy is above this many bits")
	fs.StringVar(&o.plot, "plot", "", "also draw the class shares per bin into `FILE` (.png or .svg)")
	fs.Uint64Var(&o.seed, "seed", 1, "random seed for the cross-validation")
	fs.IntVar(&o.trees, "trees", 200, "trees in each cross-validation forest")
	fs.StringVarP(&o.output, "output", "o", "-", "write the report to `FILE` (- is standard output)")
}

func newOverlapCommand(g *globalOptions) *cobra.Command {
	var opts overlapOptions
	return withFlags(&cobra.Command{
		Use:   "overlap LOG",
		Short: "Show which ID ranges are ambiguous on your ground, and what the model resolves there",
		Long: `overlap shows, from your own history, which values of your detector's single
number "could be anything": per bin, the dig count, class shares, entropy and
top classes; adjacent bins where the top class has under 80% or the entropy is
over 1 bit merge into ambiguous ranges. Each range lists what collides there
and each keeper's chance in words ("1 in 14 digs between 84 and 90 was a gold
ring"); ranges where only trash collides are marked (skipping them costs
nothing). For each range it compares the majority-of-bin rule with spade's
held-out predictions (cross-validated, or a model's out-of-bag ones): accuracy,
mean entropy before and after, and the trash skippable there while keeping
99% of keepers.`,
		Example: "  spade overlap digs.csv --values values.toml --plot overlap.png\n" +
			"  spade overlap digs.csv --model my.spade --by phase_10000 --bin 3 --format json",
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error { return runOverlap(cmd.Context(), g, opts, args) },
	}, &opts)
}

// check refuses flags out of range before any reading.
func (o *overlapOptions) check() error {
	if o.plot != "" {
		if _, err := plots.FormatOf(o.plot); err != nil {
			return usageError{Err: err}
		}
	}
	if o.trees < 1 {
		return usagef("--trees must be at least 1, got %d", o.trees)
	}
	if o.minTop <= 0 || o.minTop > 1 || o.maxEntropy <= 0 || o.bin < 0 {
		return usagef("need 0 < --min-top-share <= 1, --max-entropy > 0 and --bin >= 0")
	}
	return nil
}

func runOverlap(ctx context.Context, g *globalOptions, opts overlapOptions, args []string) error {
	h, err := g.readHistory(&opts.in, &opts.values, &opts.format, opts.check, map[string]string{"-o": opts.output, "--plot": opts.plot}, args[0], opts.model)
	if err != nil {
		return err
	}
	log, kind, ds, vals := h.log, h.kind, h.ds, h.vals
	if log.DisplayIDOnly && opts.model != "" {
		return usagef("--model: this log has display IDs only, and a model needs phase and amplitude readings; leave out --model")
	}
	// The axis first: a wrong --by is said before the cross-validation.
	axis, by, unit, err := overlap.Axis(log, opts.by)
	if err != nil {
		return usagef("--by: %w", err)
	}
	var probs [][]float64
	var notes []string
	switch {
	case log.DisplayIDOnly:
		// No readings, no model: the ranges are the digs' own.
	case opts.model != "":
		if probs, notes, err = modelProbs(opts.model, kind, log, ds); err != nil {
			return err
		}
	default:
		ev, err := evaluateDataset(ctx, g, ds, 5, opts.trees, opts.seed, nil, opts.format.json())
		if err != nil {
			return err
		}
		probs = ev.Probs
	}
	keepers, hazards := classify.Roles(vals, ds.Classes)
	res, err := overlap.Analyse(by, axis, ds.Classes, ds.Y, probs, overlap.Options{Width: opts.bin, MinTopShare: opts.minTop, MaxEntropy: opts.maxEntropy, Keepers: keepers, Hazards: hazards})
	if err != nil {
		return err
	}
	res.Notes = append(res.Notes, notes...)
	if log.DisplayIDOnly {
		res.Notes = append(res.Notes, "This log has display IDs only: the ranges come from your digs alone. Log phase and amplitude at two or more frequencies and overlap also shows what spade resolves in each range.")
	}
	if opts.plot != "" {
		season := report.Season{Overlap: res, Unit: unit, Keepers: keepers, Hazards: hazards}
		for _, p := range season.Pictures(report.PictureOverlap) {
			if err := p.WriteFile(opts.plot); err != nil {
				return err
			}
		}
		defer g.note("wrote %s", opts.plot)
	}
	return g.writeOutput(opts.output, func(w io.Writer) error {
		switch opts.format.value {
		case "json":
			return writeJSON(w, res)
		case "csv":
			return res.WriteCSV(w)
		}
		res.WriteTable(w, vals != nil)
		return nil
	})
}
