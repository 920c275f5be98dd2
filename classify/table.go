package classify

import (
	"bufio"
	"fmt"
	"io"
	"slices"
	"strings"

	"github.com/spade-detect/spade/internal/textui"
)

// TableWriter is the table view of results, for a person: each reading in
// at most 80 columns, its caution first; warnings about the model as a
// whole (Classifier.Warnings) head it.
type TableWriter struct {
	w        *bufio.Writer
	top      int
	n        int
	warnings []string
}

// NewTableWriter writes results as tables, each with its top classes (and
// every class behind a caution).
func NewTableWriter(w io.Writer, top int, warnings []string) *TableWriter {
	return &TableWriter{w: bufio.NewWriter(w), top: top, warnings: warnings}
}

func (t *TableWriter) Write(r *Result) error {
	if t.n == 0 {
		for _, w := range t.warnings {
			fmt.Fprint(t.w, textui.Wrap("!! "+w, 78, ""))
		}
	}
	t.n++
	WriteTable(t.w, r, t.top)
	return nil
}

// Stop says in the table what stopped the run.
func (t *TableWriter) Stop(err error) {
	fmt.Fprint(t.w, textui.Wrap("stopped: "+firstLine(err.Error()), 78, ""))
}

func (t *TableWriter) Close() error { return t.w.Flush() }

// WriteTable writes one reading's result in at most 80 columns, its top
// classes and every class behind a caution; a caution is the first thing
// said.
func WriteTable(w io.Writer, r *Result, top int) {
	fmt.Fprintf(w, "%s\n", strings.Repeat("─", 78))
	if c := r.Caution; c != nil {
		fmt.Fprint(w, textui.WrapHanging(r.Dig+"  ", "!! "+c.Message, 78, "     "))
		fmt.Fprint(w, textui.Wrap(hazardLine(r)+"; a probability is never a guarantee", 78, "     "))
	} else {
		// At most 80 columns (Wrap's width is exclusive), so a long class
		// name or dig id goes on a second line.
		fmt.Fprint(w, textui.WrapHanging(r.Dig+"  ", verdictLine(r), 81, "     "))
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
func hazardLine(r *Result) string {
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

func verdictLine(r *Result) string {
	d := r.Decision
	switch d.Verdict {
	case VerdictUnsure:
		return fmt.Sprintf("UNSURE: looks most like %s (%s), but see below", r.Top.Class, textui.Prob(r.Top.Probability, 0))
	case VerdictNone:
		return fmt.Sprintf("no verdict: looks most like %s (%s); give --values for one", r.Top.Class, textui.Prob(r.Top.Probability, 0))
	case VerdictDig:
		return fmt.Sprintf("DIG: %s %s, expected value %+.1f by your values", r.Top.Class, textui.Prob(r.Top.Probability, 0), d.ExpectedValue)
	default:
		return fmt.Sprintf("skip: %s %s, expected value %+.1f by your values", r.Top.Class, textui.Prob(r.Top.Probability, 0), d.ExpectedValue)
	}
}

func shareList(ps []ClassP, n int) string {
	var s []string
	for _, p := range ps[:min(n, len(ps))] {
		if p.Probability < 0.01 {
			break
		}
		s = append(s, p.Class+" "+textui.Prob(p.Probability, 0))
	}
	return strings.Join(s, ", ")
}
