package main

import (
	"context"
	"fmt"
	"sort"
	"strings"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/internal/textui"
	"github.com/spade-detect/spade/train"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

type inspectOptions struct {
	format formatFlag
}

func (o *inspectOptions) AddFlags(fs *pflag.FlagSet) { o.format.AddFlags(fs, "table", "json") }

func newInspectCommand(g *globalOptions) *cobra.Command {
	var opts inspectOptions
	return withFlags(&cobra.Command{
		Use:     "inspect MODEL",
		Short:   "Show what a model was trained on and how well it did",
		Long:    "inspect shows a model file's frequencies, features, classes with their dig counts, date, seed, spade version, out-of-bag figures and which features the forest leans on.",
		Example: "  spade inspect my.spade\n  spade inspect my.spade --format json",
		Args:    cobra.ExactArgs(1),
		RunE:    func(cmd *cobra.Command, args []string) error { return runInspect(cmd.Context(), g, opts, args) },
	}, &opts)
}

func runInspect(_ context.Context, g *globalOptions, opts inspectOptions, args []string) error {
	if err := opts.format.check(); err != nil {
		return err
	}
	b, err := train.LoadWith(args[0], train.LoadOptions{NoOutOfBag: true, Whitened: true, Mapped: true}) // as classify: what it shows is checked
	if err != nil {
		return err
	}
	w := g.stdout
	s := b.Summary
	if opts.format.json() {
		return writeJSON(w, map[string]any{"format": b.Format, "spec": b.Spec, "label": b.Label, "classes": b.Classes, "summary": s, "hazard_check": classify.HazardStatusOf(b)})
	}
	fmt.Fprintf(w, "model %s (format %d)\n", args[0], b.Format)
	fmt.Fprint(w, textui.Wrap(classify.HazardStatusOf(b).Text, 78, "  "))
	switch {
	case s.Created != "":
		fmt.Fprintf(w, "  made by spade %s on %s, seed %d\n", s.SpadeVersion, s.Created, s.Seed)
	case s.LatestDig != "":
		fmt.Fprintf(w, "  made by spade %s, seed %d, from digs up to %s\n", s.SpadeVersion, s.Seed, s.LatestDig)
	default:
		fmt.Fprintf(w, "  made by spade %s, seed %d, from digs without dates\n", s.SpadeVersion, s.Seed)
	}
	fmt.Fprintf(w, "  frequencies  %s Hz (amplitudes relative to %d Hz)\n", joinInts(b.Spec.Freqs), b.Spec.RefHz)
	fmt.Fprintf(w, "  forest       %d trees, %d features tried per split\n", s.Trees, s.Mtry)
	fmt.Fprintf(w, "  trained on   %d digs (%d rows skipped), label %s\n", s.Digs, s.Skipped, b.Label)
	fmt.Fprintf(w, "  out-of-bag   accuracy %.3f, balanced %.3f, log-loss %.3f, ECE %.3f\n",
		s.OutOfBag.Accuracy, s.OutOfBag.BalancedAccuracy, s.OutOfBag.LogLoss, s.OutOfBag.ECE)
	fmt.Fprintf(w, "\n  %-32s %6s %8s\n", "class", "digs", "recall")
	for _, c := range b.Classes {
		fmt.Fprintf(w, "  %-32s %6d %8.2f\n", textui.Trunc(c, 32), s.ClassCounts[c], s.OutOfBag.PerClass[c].Recall)
	}
	names := append([]string(nil), b.Spec.Names...)
	sort.SliceStable(names, func(i, j int) bool { return s.Importance[names[i]] > s.Importance[names[j]] })
	fmt.Fprintf(w, "\n  %-20s %s\n", "feature", "share of the forest's impurity decrease")
	for _, n := range names {
		fmt.Fprintf(w, "  %-20s %s %4.1f%%\n", n, textui.Bar(s.Importance[n], 30), 100*s.Importance[n])
	}
	if sc := b.Screen; sc != nil {
		fmt.Fprintf(w, "\n  ordnance screen (%s): %d simulated munitions, %d of your digs\n  (%d hazardous); out of bag:\n", sc.Library, sc.LibraryDigs, sc.HistoryDigs, sc.OwnHazardDigs)
		fmt.Fprintf(w, "  %-22s %14s %16s %16s\n", "judging by", "warns from", "munitions caught", "your digs flagged")
		for _, p := range []struct {
			name string
			f    *train.ScreenForest
		}{{"phase and amplitude", &sc.Plain}, {"with depth", sc.Depth}} {
			if p.f == nil {
				continue
			}
			o := p.f.OutOfBag
			fmt.Fprintf(w, "  %-22s %14.2f %16s %16s\n", p.name, p.f.Low, textui.Pct(o.LibraryCaught), textui.Pct(o.DigsFlagged))
		}
	}
	return nil
}

func joinInts(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = fmt.Sprint(x)
	}
	return strings.Join(s, ", ")
}
