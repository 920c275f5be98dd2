package report

import (
	"fmt"
	"io"
	"path/filepath"

	"github.com/spade-detect/spade/classify/overlap"
	"github.com/spade-detect/spade/classify/plots"
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

// Picture is one figure of a report: its file name in the report's
// folder, a title, a one-line caption saying how to read it, and how it is
// drawn.
type Picture struct {
	File, Title, Caption string
	draw                 func(w io.Writer, format string) error
}

// Picture names, for Pictures.
const (
	PictureOverlap     = "overlap.png"
	PictureReliability = "reliability.png"
	PictureConfusion   = "confusion.png"
	PictureSpectra     = "spectra.png"
)

// Pictures lists the pictures of s with these file names, in that order;
// one the season has no data for (no ranges, no forest) is left out.
func (s *Season) Pictures(files ...string) []Picture {
	var out []Picture
	for _, f := range files {
		if p, ok := s.picture(f); ok {
			out = append(out, p)
		}
	}
	return out
}

func (s *Season) picture(file string) (Picture, bool) {
	ev, ds := s.Eval, s.Dataset
	model := ev != nil && !ev.BaselineOnly
	switch file {
	case PictureOverlap:
		if s.Overlap == nil || len(s.Overlap.Bins) == 0 {
			return Picture{}, false
		}
		return Picture{File: file, draw: func(w io.Writer, f string) error {
			return plots.Overlap(w, f, s.Overlap, s.Unit, append(append([]string{}, s.Hazards...), s.Keepers...))
		}}, true
	case PictureReliability:
		return Picture{File: file, draw: func(w io.Writer, f string) error {
			return plots.Reliability(w, f, ev.Model.Reliability)
		}}, model
	case PictureConfusion:
		return Picture{File: file, draw: func(w io.Writer, f string) error {
			return plots.Confusion(w, f, ds.Classes, ev.Model.Confusion)
		}}, model
	case PictureSpectra:
		if s.Log == nil || s.Log.DisplayIDOnly {
			return Picture{}, false
		}
		return Picture{File: file, draw: func(w io.Writer, f string) error {
			return plots.Spectra(w, f, s.Log.Freqs, ds.Classes, phasesOf(s.Log), ds.Y)
		}}, true
	}
	return Picture{}, false
}

// phasesOf gives each dig's phase at each of the log's frequencies.
func phasesOf(log *features.Log) [][]float64 {
	phases := make([][]float64, len(log.Digs))
	for i := range log.Digs {
		for _, r := range log.Digs[i].Readings {
			phases[i] = append(phases[i], r.Phase())
		}
	}
	return phases
}

// WriteFile draws the picture into path, atomically, as PNG or SVG by the
// path's extension.
func (p Picture) WriteFile(path string) error { return plots.WriteFile(path, p.draw) }

// WritePictures draws pics into dir, each written atomically, and returns
// their paths.
func WritePictures(dir string, pics []Picture) ([]string, error) {
	var paths []string
	for _, p := range pics {
		path := filepath.Join(dir, p.File)
		if err := p.WriteFile(path); err != nil {
			return paths, fmt.Errorf("cannot write %s: %w", path, err)
		}
		paths = append(paths, path)
	}
	return paths, nil
}
