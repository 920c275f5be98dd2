package report

import (
	"fmt"
	"io"
	"sort"
	"strings"

	"github.com/spade-detect/spade/internal/textui"
	"github.com/spade-detect/spade/train"
)

// WriteEvaluation writes what evaluate found in 80 columns: spade next to
// the one number, the learning curve, dig saving, the ordnance screen (or
// that the hazard check is unavailable), per-class figures, the commonest
// mistakes and reliability. label is the kind of class told apart. An
// evaluation that measured no screen (ev.Screen nil) says nothing of it:
// WriteScreen(w, nil) says the check is unavailable.
func WriteEvaluation(w io.Writer, ev *train.Evaluation, label string) {
	how := "stratified"
	if ev.GroupedBy != "" {
		how = "whole groups by " + ev.GroupedBy + " held out together"
	}
	fmt.Fprint(w, textui.Wrap(fmt.Sprintf("Cross-validated on %d digs: %d folds (%s), seed %d, %d classes (%s).",
		ev.Digs, ev.Folds, how, ev.Seed, len(ev.Classes), label), 80, ""))
	fmt.Fprintln(w)
	for _, n := range ev.Warnings {
		fmt.Fprint(w, textui.Wrap("note: "+n+".", 78, ""))
	}
	if len(ev.Warnings) > 0 {
		fmt.Fprintln(w)
	}
	if ev.BaselineOnly {
		writeBaselineEvaluation(w, ev)
		return
	}
	m, b := ev.Model, ev.Baseline
	fmt.Fprintf(w, "%-26s %10s %18s\n", "", "spade", "one number")
	fmt.Fprintf(w, "%-26s %10s %18s\n", "", "", "("+ev.BaselineAxis+")")
	row := func(name string, x, y float64, better string) {
		fmt.Fprintf(w, "%-26s %10.3f %18.3f   %s\n", name, x, y, better)
	}
	row("accuracy", m.Accuracy, b.Accuracy, "higher is better")
	row("balanced accuracy", m.BalancedAccuracy, b.BalancedAccuracy, "")
	row("log-loss", m.LogLoss, b.LogLoss, "lower is better")
	row("Brier score", m.Brier, b.Brier, "")
	row("calibration error (ECE)", m.ECE, b.ECE, "")
	if v := ev.Verdict(); v != "" {
		fmt.Fprint(w, textui.Wrap(v, 78, ""))
	}
	if len(ev.Learning) > 0 {
		fmt.Fprintf(w, "\nLearning curve: the same folds, learning from part of each fold's digs\n")
		fmt.Fprintf(w, "  %-10s %8s %10s %10s\n", "share", "digs", "accuracy", "log-loss")
		for _, p := range ev.Learning {
			fmt.Fprintf(w, "  %-10s %8d %10.3f %10.3f\n", textui.Pct(p.Share), p.Digs, p.Accuracy, p.LogLoss)
		}
		fmt.Fprint(w, textui.Wrap(ev.LearningVerdict, 78, "  "))
	}
	if d := ev.DigSaving; d != nil {
		fmt.Fprintf(w, "\nDig saving: trash digs you could have skipped, keeping your keepers\n")
		fmt.Fprintf(w, "(%d keeper and %d trash digs)\n", d.KeeperDigs, d.TrashDigs)
		fmt.Fprint(w, textui.Wrap("keepers: "+strings.Join(d.Keepers, ", "), 78, "  "))
		fmt.Fprintf(w, "  %-18s %27s %27s\n", "keeping", "spade", "one number")
		cell := func(p train.SavingPoint) string {
			return fmt.Sprintf("%s skip, lost %d of %d", textui.Pct(p.TrashSkipped), p.KeepersLost, p.Keepers)
		}
		for i, p := range d.Model {
			fmt.Fprintf(w, "  %-18s %27s %27s\n", fmt.Sprintf("%.0f%% of keepers", 100*p.Keep), cell(p), cell(d.Baseline[i]))
		}
		if len(d.Hazards) > 0 {
			fmt.Fprintf(w, "  (hazard classes %s are never to be dug and are left out)\n", strings.Join(d.Hazards, ", "))
		}
	}
	if ev.Screen != nil {
		WriteScreen(w, ev.Screen)
	}
	writePerClass(w, "spade", ev.Classes, m)
	fmt.Fprintf(w, "\nReliability (spade): when the top class has probability p, how often it is right\n")
	fmt.Fprintf(w, "  %-10s %6s %8s %8s\n", "p", "digs", "mean p", "right")
	for _, r := range m.Reliability {
		if r.Count == 0 {
			continue
		}
		fmt.Fprintf(w, "  %.1f-%.1f    %6d %8.2f %8.2f\n", r.Lo, r.Hi, r.Count, r.Confidence, r.Accuracy)
	}
}

// writeBaselineEvaluation is the report of a log of display IDs only: the
// one number's own figures, per class and in dig saving, and what phase and
// amplitude would add (the note among the warnings above it).
func writeBaselineEvaluation(w io.Writer, ev *train.Evaluation) {
	b := ev.Baseline
	fmt.Fprintf(w, "%-26s %18s\n", "", "one number")
	fmt.Fprintf(w, "%-26s %18s\n", "", "("+ev.BaselineAxis+")")
	row := func(name string, y float64, better string) { fmt.Fprintf(w, "%-26s %18.3f   %s\n", name, y, better) }
	row("accuracy", b.Accuracy, "higher is better")
	row("balanced accuracy", b.BalancedAccuracy, "")
	row("log-loss", b.LogLoss, "lower is better")
	row("Brier score", b.Brier, "")
	row("calibration error (ECE)", b.ECE, "")
	if d := ev.DigSaving; d != nil {
		fmt.Fprintf(w, "\nDig saving by the one number: trash digs you could have skipped\n")
		fmt.Fprintf(w, "(%d keeper and %d trash digs)\n", d.KeeperDigs, d.TrashDigs)
		fmt.Fprint(w, textui.Wrap("keepers: "+strings.Join(d.Keepers, ", "), 78, "  "))
		for _, p := range d.Baseline {
			fmt.Fprintf(w, "  keeping %3.0f%% of keepers: %s skip, lost %d of %d\n", 100*p.Keep, textui.Pct(p.TrashSkipped), p.KeepersLost, p.Keepers)
		}
	}
	writePerClass(w, "one number", ev.Classes, b)
	fmt.Fprintf(w, "\nOrdnance screen\n")
	fmt.Fprint(w, textui.Wrap("HAZARD CHECK UNAVAILABLE: a log of display IDs only carries no ordnance screen, and the one number cannot warn of munitions your history lacks.", 78, "  "))
}

// writePerClass is the per-class table and the commonest mistakes of one
// learner ("spade", or "one number" for the baseline).
func writePerClass(w io.Writer, who string, classes []string, m train.Metrics) {
	title := "Per class (" + who + ")"
	fmt.Fprintf(w, "\n%s%*s %9s %7s %6s\n", title, 36-len(title), "digs", "precision", "recall", "F1")
	for _, c := range classes {
		pc := m.PerClass[c]
		fmt.Fprintf(w, "  %-32s %5d %9.2f %7.2f %6.2f\n", textui.Trunc(c, 32), pc.Support, pc.Precision, pc.Recall, pc.F1)
	}
	writeConfusions(w, who, classes, m.Confusion)
}

// WriteScreen reports the ordnance screen: on spade's simulated munitions,
// each group held out from the screen's own fit, and on the user's digs;
// nil says that the log cannot carry one, so the hazard check is
// unavailable.
func WriteScreen(w io.Writer, s *train.ScreenEvaluation) {
	fmt.Fprintf(w, "\nOrdnance screen: would it warn of munitions your history lacks?\n")
	if s == nil {
		fmt.Fprint(w, textui.Wrap("HAZARD CHECK UNAVAILABLE: this log cannot carry an ordnance screen (no usable amplitudes), so a model of it warns only from your own hazardous digs.", 78, "  "))
		return
	}
	col := "no depth"
	if s.Depth {
		col = "with depth"
	}
	withDepth := ""
	if s.Depth {
		withDepth = fmt.Sprintf(", %.0f%% with their depth", 100*s.CaughtDepth)
	}
	fmt.Fprint(w, textui.Wrap(fmt.Sprintf("Simulated munitions (%s) read as your instrument would, each group scored by a screen fitted without it: %.0f%% warned of by phase and amplitude alone%s.",
		s.Library, 100*s.Caught, withDepth), 78, "  "))
	fmt.Fprintf(w, "  %-32s %9s %11s\n", "held-out group", "no depth", col)
	for _, gc := range s.Groups {
		d := textui.Pct(gc.Caught)
		if s.Depth {
			d = textui.Pct(gc.CaughtDepth)
		}
		fmt.Fprintf(w, "  %-32s %9s %11s\n", textui.Trunc(gc.Group, 32), textui.Pct(gc.Caught), d)
	}
	by := "by phase and amplitude"
	if s.Depth {
		by = "with depth"
	}
	line := fmt.Sprintf("Your own digs, out of bag (%s): the screen flags %.0f%% of %d trash digs", by, 100*s.TrashFlagged, s.TrashDigs)
	if s.KeeperDigs > 0 {
		line += fmt.Sprintf(" and %.0f%% of %d keepers", 100*s.KeepersFlagged, s.KeeperDigs)
	}
	if s.OwnHazardDigs > 0 {
		line += fmt.Sprintf("; it catches %.0f%% of your %d hazardous digs", 100*s.OwnHazardCaught, s.OwnHazardDigs)
	}
	fmt.Fprint(w, textui.Wrap(line+".", 78, "  "))
}

// writeConfusions lists the commonest mistakes, which read better in 80
// columns than a 13-by-13 matrix (the JSON has the whole matrix).
func writeConfusions(w io.Writer, who string, classes []string, cm map[string]map[string]int) {
	mixes := commonestMistakes(classes, cm, 8)
	if len(mixes) == 0 {
		return
	}
	fmt.Fprintf(w, "\nCommonest mistakes (%s, held-out)\n", who)
	for _, x := range mixes {
		fmt.Fprintf(w, "  %-24s taken for %-24s %4d of %d\n", textui.Trunc(x.Truth, 24), textui.Trunc(x.Taken, 24), x.N, x.Of)
	}
}

// mistake is one cell off the confusion matrix's diagonal: N of the Of
// digs of class Truth were taken for Taken.
type mistake struct {
	Truth, Taken string
	N, Of        int
}

// commonestMistakes lists at most n cells off the diagonal of cm, the
// largest first (ties in class order).
func commonestMistakes(classes []string, cm map[string]map[string]int, n int) []mistake {
	var mixes []mistake
	for _, t := range classes {
		of := 0
		for _, v := range cm[t] {
			of += v
		}
		for _, p := range classes {
			if p != t && cm[t][p] > 0 {
				mixes = append(mixes, mistake{t, p, cm[t][p], of})
			}
		}
	}
	sort.SliceStable(mixes, func(i, j int) bool { return mixes[i].N > mixes[j].N })
	return mixes[:min(n, len(mixes))]
}
