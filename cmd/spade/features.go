package main

import (
	"context"
	"io"

	"github.com/spade-detect/spade/internal/cli"

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
	cmd := &cobra.Command{
		Use:   "features LOG",
		Short: "Write the phasor feature vector of every dig as CSV",
		Long: `features turns each dig's multi-frequency readings into the feature vector the
classifier learns from (phases, amplitude ratios, phase slope, fitted time
constant, ferrous fraction, fit residual, display ID) and writes one CSV row per
dig: dig id, material, shape and the named features. Use it to look at your
data in a spreadsheet or to compare against another learner.`,
		Example: "  spade features digs.csv -o features.csv\n  spade simulate --n 200 | spade features -",
		Args:    cobra.ExactArgs(1),
		RunE:    func(cmd *cobra.Command, args []string) error { return runFeatures(cmd.Context(), g, opts, args) },
	}
	opts.AddFlags(cmd.Flags())
	return cmd
}

func runFeatures(_ context.Context, g *globalOptions, opts featuresOptions, args []string) error {
	if len(args) > 0 {
		if err := cli.CheckOutputs(map[string]string{"-o": opts.output}, args[0]); err != nil {
			return err
		}
	}
	log, err := g.readLog(args[0], opts.log.readOptions())
	if err != nil {
		return err
	}
	spec := features.SpecOf(log)
	g.specNotes(spec)
	return g.writeOutput(opts.output, func(w io.Writer) error { return features.WriteFeatureTable(w, log, spec) })
}
