package main

import (
	"context"
	"io"

	"github.com/spade-detect/spade/internal/cli"
	"github.com/spade-detect/spade/internal/textui"

	"github.com/spade-detect/spade/features"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

type featuresOptions struct {
	log    logOptions
	output string
}

func (o *featuresOptions) AddFlags(fs *pflag.FlagSet) {
	o.log.AddFlags(fs)
	fs.StringVarP(&o.output, "output", "o", "-", "write the table to `FILE` (- is standard output)")
}

func newFeaturesCommand(g *globalOptions) *cobra.Command {
	var opts featuresOptions
	return withFlags(&cobra.Command{
		Use:   "features LOG",
		Short: "Write the phasor feature vector of every dig as CSV",
		Long: `features turns each dig's multi-frequency readings into the feature vector the
classifier learns from (phases, amplitude ratios, phase slope, fitted time
constant, ferrous fraction, fit residual, display ID) and writes one CSV row per
dig: dig id, material, shape and the named features. Use it to look at your
data in a spreadsheet or to compare against another learner. A file is read
twice and streams through, holding no more than its dig ids, whatever its
length; standard input is held whole.`,
		Example: "  spade features digs.csv -o features.csv\n  spade simulate --n 200 | spade features -",
		Args:    cobra.ExactArgs(1),
		RunE:    func(cmd *cobra.Command, args []string) error { return runFeatures(cmd.Context(), g, opts, args) },
	}, &opts)
}

func runFeatures(_ context.Context, g *globalOptions, opts featuresOptions, args []string) error {
	if err := cli.CheckOutputs(map[string]string{"-o": opts.output}, args[0]); err != nil {
		return err
	}
	f, err := openLog(g, args[0])
	if err != nil {
		return err
	}
	defer f.Close()
	// The bar follows both passes over a file (WriteFeatureTableFrom).
	in, bar := textui.ReadingBar(g.stderr, f, "reading "+args[0], g.isTerminal && !g.quiet)
	defer bar.Done()
	return g.writeOutput(opts.output, func(w io.Writer) error {
		log, err := features.WriteFeatureTableFrom(w, in, args[0], opts.log.readOptions())
		if err == nil {
			g.reportLog(log)
			g.specNotes(features.SpecOf(log))
		}
		return err
	})
}
