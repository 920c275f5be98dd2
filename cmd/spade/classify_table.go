package main

import (
	"bufio"
	"fmt"
	"io"
	"slices"
	"strings"

	"github.com/spade-detect/spade/internal/cli"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/internal/textui"
)

// tableWriter is classify's table view: each reading in at most 80
// columns, its caution first.
type tableWriter struct {
	w        *bufio.Writer
	top      int
	n        int
	warnings []string
}

func (t *tableWriter) Write(r *classify.Result) error {
	if t.n == 0 {
		for _, w := range t.warnings {
			fmt.Fprint(t.w, textui.Wrap("!! "+w, 78, ""))
		}
	}
	t.n++
	writeResultTable(t.w, r, t.top)
	return nil
}

// Stop says in the table what stopped the run.
func (t *tableWriter) Stop(err error) {
	fmt.Fprint(t.w, textui.Wrap("stopped: "+cli.OneLine(err), 78, ""))
}

func (t *tableWriter) Close() error { return t.w.Flush() }

// writeResultTable prints one reading in at most 80 columns; a caution is
// the first thing said.
func writeResultTable(w io.Writer, r *classify.Result, top int) {
	fmt.Fprintf(w, "%s\n", strings.Repeat("─", 78))
	if c := r.Caution; c != nil {
		fmt.Fprint(w, textui.WrapHanging(r.Dig+"  ", "!! "+c.Message, 78, "     "))
		fmt.Fprint(w, textui.Wrap(hazardLine(r)+"; a probability is never a guarantee", 78, "     "))
	} else {
		fmt.Fprintf(w, "%s  %s\n", r.Dig, verdictLine(r))
	}
	if r.Novelty.Unfamiliar {
		fmt.Fprint(w, textui.Wrap("?? "+r.Decision.Note, 78, "     "))
	}
	for i, cp := range r.Ranked {
		// The top classes, and always every class behind a caution.
		hazard := r.Caution != nil && slices.Contains(r.Caution.Classes, cp.Class)
		if !hazard && (i >= top || cp.Probability < 0.005) {
			continue
		}
		fmt.Fprintf(w, "     %-28s %s %6s\n", textui.Trunc(cp.Class, 28), textui.Bar(cp.Probability, 30), textui.Prob(cp.Probability, 1))
	}
	fmt.Fprint(w, textui.Wrap("material: "+shareList(r.Materials, 4), 78, "     "))
	fmt.Fprint(w, textui.Wrap("shape: "+shareList(r.Shapes, 4), 78, "     "))
	if r.Caution == nil {
		fmt.Fprint(w, textui.Wrap(hazardLine(r), 78, "     "))
	}
	fmt.Fprintf(w, "     novelty: %s percentile of your digs\n", textui.Ordinal(int(r.Novelty.Percentile)))
	if r.Learn.Worth {
		fmt.Fprint(w, textui.Wrap(fmt.Sprintf("worth digging to learn: the model is unsure (top class %s), so what comes out would teach it most", textui.Prob(r.Top.Probability, 0)), 78, "     "))
	}
	var nb []string
	for _, n := range r.Neighbours {
		nb = append(nb, fmt.Sprintf("%s %s (%s, %.2f)", n.Dig, n.Class, n.Date, n.Distance))
	}
	fmt.Fprint(w, textui.Wrap("nearest past digs: "+strings.Join(nb, "; "), 78, "     "))
}

// hazardLine says what the hazard check found, in one line.
func hazardLine(r *classify.Result) string {
	h := r.Hazard
	if !h.Available {
		return "hazard check: UNAVAILABLE for this model"
	}
	parts := []string{}
	if h.ScreenUsed != "" {
		parts = append(parts, fmt.Sprintf("ordnance screen %s (by %s)", textui.Prob(h.Screen, 0), h.ScreenUsed))
	}
	if h.History >= 0.01 || r.Caution != nil && len(r.Caution.Classes) > 0 {
		parts = append(parts, "your hazardous classes "+textui.Prob(h.History, 1))
	}
	return fmt.Sprintf("hazard check: %s; %s", h.Tier, strings.Join(parts, ", "))
}

func verdictLine(r *classify.Result) string {
	d := r.Decision
	switch d.Verdict {
	case classify.VerdictUnsure:
		return fmt.Sprintf("UNSURE: looks most like %s (%s), but see below", r.Top.Class, textui.Prob(r.Top.Probability, 0))
	case classify.VerdictNone:
		return fmt.Sprintf("no verdict: looks most like %s (%s); give --values for one", r.Top.Class, textui.Prob(r.Top.Probability, 0))
	case classify.VerdictDig:
		return fmt.Sprintf("DIG: %s %s, expected value %+.1f by your values", r.Top.Class, textui.Prob(r.Top.Probability, 0), d.ExpectedValue)
	default:
		return fmt.Sprintf("skip: %s %s, expected value %+.1f by your values", r.Top.Class, textui.Prob(r.Top.Probability, 0), d.ExpectedValue)
	}
}

func shareList(ps []classify.ClassP, n int) string {
	var s []string
	for _, p := range ps[:min(n, len(ps))] {
		if p.Probability < 0.01 {
			break
		}
		s = append(s, p.Class+" "+textui.Prob(p.Probability, 0))
	}
	return strings.Join(s, ", ")
}
