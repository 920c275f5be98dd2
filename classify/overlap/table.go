package overlap

import (
	"fmt"
	"io"
	"strings"

	"github.com/spade-detect/spade/internal/textui"
)

// WriteTable writes the ranges for a person, in 80 columns: each range's
// classes, hazards first, then keepers' chances, then what the model
// resolves there. keepersNamed false adds a line saying how to name them.
func (r *Result) WriteTable(w io.Writer, keepersNamed bool) {
	fmt.Fprintf(w, "Ambiguous %s ranges in your %d digs (bins of %g; ambiguous when the top\n", r.By, r.Digs, r.Width)
	fmt.Fprintf(w, "class has under %.0f%% or the entropy is over %g bit)\n", 100*r.MinTopShare, r.MaxEntropy)
	for _, n := range r.Notes {
		fmt.Fprint(w, textui.Wrap("note: "+n, 78, ""))
	}
	if len(r.Ranges) == 0 {
		fmt.Fprintln(w, "\nNo ambiguous ranges: every bin has a clear top class.")
	}
	for _, rg := range r.Ranges {
		fmt.Fprintf(w, "\n%s to %s: %d digs, %.1f bits", Edge(rg.From), Edge(rg.To), rg.Digs, rg.Entropy)
		if rg.TrashOnly {
			fmt.Fprint(w, ", only trash collides here: skipping costs nothing")
		}
		fmt.Fprintln(w)
		var cl []string
		for _, c := range rg.Classes[:min(5, len(rg.Classes))] {
			cl = append(cl, fmt.Sprintf("%s %.0f%%", c.Class, 100*c.Share))
		}
		if len(rg.Classes) > 5 {
			cl = append(cl, fmt.Sprintf("%d more", len(rg.Classes)-5))
		}
		fmt.Fprint(w, textui.Wrap(strings.Join(cl, ", "), 78, "  "))
		for _, h := range rg.Hazards {
			fmt.Fprint(w, textui.Wrap("!! "+h.Words+" (possible ordnance)", 78, "  "))
		}
		for _, k := range rg.Keepers {
			fmt.Fprint(w, textui.Wrap(k.Words, 78, "  "))
		}
		if res := rg.Resolution; res != nil {
			line := fmt.Sprintf("spade is right on %.0f%% of these digs where the majority rule is right on %.0f%%; entropy %.1f -> %.1f bits",
				100*res.ModelAccuracy, 100*res.MajorityAccuracy, res.EntropyBefore, res.EntropyAfter)
			if res.TrashSkipped != nil {
				line += fmt.Sprintf("; %.0f%% of the trash here could be skipped keeping 99%% of keepers", 100**res.TrashSkipped)
			}
			fmt.Fprint(w, textui.Wrap(line, 78, "  "))
		}
	}
	if !keepersNamed {
		fmt.Fprintln(w, "\n(No keepers named: give --values or --keep to see each keeper's chance.)")
	}
}
