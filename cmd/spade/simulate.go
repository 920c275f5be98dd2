package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/spade-detect/spade/datasets"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

type simulateOptions struct {
	scenario   string
	n          int
	seed       uint64
	freqs      string
	unlabelled bool
	output     string
}

func (o *simulateOptions) AddFlags(fs *pflag.FlagSet) {
	var names []string
	for _, s := range datasets.Scenarios {
		names = append(names, s.Name)
	}
	fs.StringVar(&o.scenario, "scenario", "demo", "the invented scenario: "+strings.Join(names, ", "))
	fs.IntVar(&o.n, "n", 1000, "how many dug targets")
	fs.Uint64Var(&o.seed, "seed", 1, "random seed; the same seed gives the same file")
	fs.StringVar(&o.freqs, "freqs", "", "frequencies in hertz, comma separated (default 4300,9700,21700,36300)")
	fs.BoolVar(&o.unlabelled, "unlabelled", false, "leave material and shape empty: readings to classify")
	fs.StringVarP(&o.output, "output", "o", "-", "write to `FILE` (- is standard output)")
}

func newSimulateCommand(g *globalOptions) *cobra.Command {
	var opts simulateOptions
	return withFlags(&cobra.Command{
		Use:   "simulate",
		Short: "Write a simulated dig log from spade's physics models",
		Long: `simulate draws dug targets from an invented scenario's object catalogue and
turns each into a dig-log row with spade's forward models: the exact conducting
permeable sphere, thin rings, thin discs as coupled rings, magnetically viscous
and saline soil, a dipole's depth fall-off, noise, and a detection threshold.
Sites and finds are invented; the display_id column is an invented monotone
map of the 10 kHz phase and copies no instrument.`,
		Example: "  spade simulate --n 500 --seed 3 -o practice.csv\n  spade simulate --scenario beach --freqs 4k,12k,36k --unlabelled",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, args []string) error { return runSimulate(cmd.Context(), g, opts) },
	}, &opts)
}

func runSimulate(_ context.Context, g *globalOptions, opts simulateOptions) error {
	freqs, err := parseFreqList(opts.freqs)
	if err != nil {
		return err
	}
	if datasets.ScenarioNamed(opts.scenario) == nil {
		return usagef("--scenario: no scenario %q", opts.scenario)
	}
	if opts.n < 1 {
		return usagef("--n must be at least 1, got %d", opts.n)
	}
	sim := datasets.Options{Scenario: opts.scenario, N: opts.n, Seed: opts.seed, Freqs: freqs, Unlabelled: opts.unlabelled}
	if err := g.writeOutput(opts.output, func(w io.Writer) error { return datasets.WriteLog(w, sim) }); err != nil {
		return fmt.Errorf("simulate: %w", err)
	}
	return nil
}
