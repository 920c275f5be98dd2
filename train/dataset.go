package train

import (
	"fmt"
	"math"
	"slices"

	"github.com/spade-detect/spade/features"
)

// Dataset is a labelled feature table: column-major features, class indices.
type Dataset struct {
	Names   []string
	Classes []string    // sorted
	Cols    [][]float64 // Cols[f][row]
	Y       []int32     // class index per row
	IDs     []string
	Dates   []string
}

// Rows is the number of rows.
func (d *Dataset) Rows() int { return len(d.Y) }

// Row copies row i into dst.
func (d *Dataset) Row(i int, dst []float64) []float64 {
	dst = dst[:0]
	for _, c := range d.Cols {
		dst = append(dst, c[i])
	}
	return dst
}

// NewDataset builds a table from rows of features and their class names.
func NewDataset(names []string, rows [][]float64, labels []string) *Dataset {
	if len(rows) != len(labels) {
		panic("train: length mismatch")
	}
	classes := slices.Clone(labels)
	slices.Sort(classes)
	classes = slices.Compact(classes)
	ds := &Dataset{Names: names, Classes: classes, Cols: make([][]float64, len(names)), Y: make([]int32, len(rows))}
	for f := range names {
		ds.Cols[f] = make([]float64, len(rows))
	}
	for i, r := range rows {
		if len(r) != len(names) {
			panic("train: length mismatch")
		}
		for f, v := range r {
			ds.Cols[f][i] = v
		}
		ci, _ := slices.BinarySearch(classes, labels[i])
		ds.Y[i] = int32(ci)
	}
	return ds
}

// FromLog extracts every dig's features with spec and labels them by kind.
// Unlabelled digs are an error (the reader refuses or skips them first).
func FromLog(log *features.Log, spec *features.FeatureSpec, kind features.Label) (*Dataset, error) {
	rows := make([][]float64, len(log.Digs))
	labels := make([]string, len(log.Digs))
	flat := make([]float64, len(log.Digs)*spec.Len())
	for i := range log.Digs {
		d := &log.Digs[i]
		if !d.Labelled(kind) {
			return nil, &features.ParseError{File: log.Name, Line: d.Line, Err: fmt.Errorf("%w: dig %s", features.ErrUnlabelled, d.ID)}
		}
		v, _, err := spec.Extract(d, flat[i*spec.Len():(i+1)*spec.Len()])
		if err != nil {
			return nil, features.DigError(log.Name, d, err)
		}
		for f, x := range v {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				// An amplitude near 1e155 squares to infinity: refused here,
				// at its line, not after a whole training.
				return nil, &features.ParseError{File: log.Name, Line: d.Line, Column: spec.Names[f], Err: fmt.Errorf("%w: the reading gives %v (a phase or amplitude out of range?)", features.ErrNotFinite, x)}
			}
		}
		rows[i] = v
		labels[i] = d.Class(kind)
	}
	ds := NewDataset(spec.Names, rows, labels)
	for i := range log.Digs {
		ds.IDs = append(ds.IDs, log.Digs[i].ID)
		ds.Dates = append(ds.Dates, log.Digs[i].Date)
	}
	return ds, nil
}

// TableOf is a log's feature table, labelled by kind, and the spec that
// made it: the whole spec of the log's frequencies, or for a log of display
// IDs only a nil spec and FromDisplayIDs' one column.
func TableOf(log *features.Log, kind features.Label) (*features.FeatureSpec, *Dataset, error) {
	if log.DisplayIDOnly {
		ds, err := FromDisplayIDs(log, kind)
		return nil, ds, err
	}
	spec := features.SpecOf(log)
	ds, err := FromLog(log, spec, kind)
	return spec, ds, err
}

// FromDisplayIDs is the one-column table of a log of display IDs only
// (features.ReadOptions.DisplayIDOnly): what the single-number baseline and
// the ambiguous ranges need, and no more.
func FromDisplayIDs(log *features.Log, kind features.Label) (*Dataset, error) {
	rows := make([][]float64, len(log.Digs))
	labels := make([]string, len(log.Digs))
	for i := range log.Digs {
		d := &log.Digs[i]
		if !d.Labelled(kind) {
			return nil, &features.ParseError{File: log.Name, Line: d.Line, Err: fmt.Errorf("%w: dig %s", features.ErrUnlabelled, d.ID)}
		}
		if math.IsNaN(d.DisplayID) || math.IsInf(d.DisplayID, 0) {
			return nil, &features.ParseError{File: log.Name, Line: d.Line, Column: features.NameDisplayID, Err: fmt.Errorf("%w: display_id is %v", features.ErrNotFinite, d.DisplayID)}
		}
		rows[i] = []float64{d.DisplayID}
		labels[i] = d.Class(kind)
	}
	ds := NewDataset([]string{features.NameDisplayID}, rows, labels)
	for i := range log.Digs {
		ds.IDs = append(ds.IDs, log.Digs[i].ID)
		ds.Dates = append(ds.Dates, log.Digs[i].Date)
	}
	return ds, nil
}

// Subset is the table restricted to rows idx, in that order.
func (d *Dataset) Subset(idx []int) *Dataset {
	s := &Dataset{Names: d.Names, Classes: d.Classes, Cols: make([][]float64, len(d.Cols)), Y: make([]int32, len(idx))}
	for f, c := range d.Cols {
		s.Cols[f] = make([]float64, len(idx))
		for j, i := range idx {
			s.Cols[f][j] = c[i]
		}
	}
	for j, i := range idx {
		s.Y[j] = d.Y[i]
	}
	if d.IDs != nil {
		for _, i := range idx {
			s.IDs = append(s.IDs, d.IDs[i])
			s.Dates = append(s.Dates, d.Dates[i])
		}
	}
	return s
}

// ClassCounts counts rows per class.
func (d *Dataset) ClassCounts() []int {
	c := make([]int, len(d.Classes))
	for _, y := range d.Y {
		c[y]++
	}
	return c
}
