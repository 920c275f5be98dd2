package report

import (
	"fmt"
	"io"
	"path/filepath"

	"github.com/spade-detect/spade/classify/plots"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// Picture is one figure of a report: its file name in the report's
// folder, and how it is drawn (the page gives its caption).
type Picture struct {
	File string
	draw func(w io.Writer, format string) error
}

// Picture names, for Pictures.
const (
	PictureOverlap     = "overlap.png"
	PictureReliability = "reliability.png"
	PictureConfusion   = "confusion.png"
	PictureSpectra     = "spectra.png"
	PictureLearning    = "learning.png"
	PictureDigSaving   = "dig-saving.png"
)

// AllPictures are the report's pictures, in the page's order.
var AllPictures = []string{PictureDigSaving, PictureLearning, PictureReliability, PictureConfusion, PictureSpectra, PictureOverlap}

// savingGrid is the keeper shares the dig-saving picture is drawn at:
// every 1 % from half the keepers to all of them.
var savingGrid = func() []float64 {
	var g []float64
	for k := 50; k <= 100; k++ {
		g = append(g, float64(k)/100)
	}
	return g
}()

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
	roles := plots.Roles{Keepers: s.Keepers, Hazards: s.Hazards}
	switch file {
	case PictureLearning:
		return Picture{File: file, draw: func(w io.Writer, f string) error {
			return plots.Learning(w, f, ev.Learning, ev.Baseline)
		}}, model && len(ev.Learning) > 0
	case PictureDigSaving:
		if ev == nil || ev.DigSaving == nil {
			return Picture{}, false
		}
		curves := train.SavingCurves(ds, s.Keepers, s.Hazards, ev.Probs, ev.BaselineProbs, savingGrid)
		return Picture{File: file, draw: func(w io.Writer, f string) error {
			return plots.DigSaving(w, f, curves.Model, curves.Baseline, train.SavingLevels)
		}}, true
	case PictureOverlap:
		if s.Overlap == nil || len(s.Overlap.Bins) == 0 {
			return Picture{}, false
		}
		return Picture{File: file, draw: func(w io.Writer, f string) error {
			return plots.Overlap(w, f, s.Overlap, s.Unit, roles)
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
			return plots.Spectra(w, f, s.Log.Freqs, ds.Classes, phasesOf(s.Log), ds.Y, roles)
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
