package report

import (
	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/classify/overlap"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// Season is what a report is drawn from: a labelled log, its table, what
// evaluate found on it, and its ambiguous ranges.
type Season struct {
	Log     *features.Log
	Dataset *train.Dataset
	Eval    *train.Evaluation
	// Overlap is the ambiguous-range analysis on the axis Unit names
	// ("display ID", "phase at 9700 Hz (degrees)"); nil leaves it out.
	Overlap *overlap.Result
	Unit    string
	// Keepers and Hazards are the classes the user keeps and never digs
	// (classify.Roles), for the pictures' colours.
	Keepers, Hazards []string
}

// NewSeason gathers a report's material: the roles of the classes by the
// user's values (nil: no keepers, the default hazards), and the ambiguous
// ranges on the log's single number (overlap.Axis's default: the display
// ID when every dig has one), with the evaluation's held-out probabilities.
func NewSeason(log *features.Log, ds *train.Dataset, ev *train.Evaluation, vals *classify.Values) (*Season, error) {
	s := &Season{Log: log, Dataset: ds, Eval: ev}
	s.Keepers, s.Hazards = classify.Roles(vals, ds.Classes)
	axis, by, unit, err := overlap.Axis(log, "")
	if err != nil {
		return nil, err
	}
	var probs [][]float64
	if !ev.BaselineOnly {
		probs = ev.Probs
	}
	if s.Overlap, err = overlap.Analyse(by, axis, ds.Classes, ds.Y, probs, overlap.Options{Keepers: s.Keepers, Hazards: s.Hazards}); err != nil {
		return nil, err
	}
	if log.DisplayIDOnly {
		s.Overlap.Notes = append(s.Overlap.Notes, "This log has display IDs only: the ranges come from your digs alone.")
	}
	s.Unit = unit
	return s, nil
}
