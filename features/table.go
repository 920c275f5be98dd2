package features

import (
	"encoding/csv"
	"io"
	"strconv"
)

// WriteFeatureTable writes one CSV row per dig: dig id, material, shape and
// the named features, for spreadsheets and for other learners. A dig whose
// features cannot be extracted is an error naming the dig's line.
func WriteFeatureTable(w io.Writer, log *Log, spec *FeatureSpec) error {
	i := 0
	return WriteFeatureRows(w, log.Name, spec, func() (Dig, error) {
		if i == len(log.Digs) {
			return Dig{}, io.EOF
		}
		i++
		return log.Digs[i-1], nil
	})
}

// WriteFeatureRows is WriteFeatureTable over digs as next gives them (until
// io.EOF), holding one at a time; name is their source's, for errors.
func WriteFeatureRows(w io.Writer, name string, spec *FeatureSpec, next func() (Dig, error)) error {
	cw := csv.NewWriter(w)
	header := append([]string{"dig", "material", "shape"}, spec.Names...)
	if err := cw.Write(header); err != nil {
		return err
	}
	rec := make([]string, len(header))
	var v []float64
	for {
		d, err := next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return err
		}
		if v, _, err = spec.Extract(&d, v); err != nil {
			return DigError(name, &d, err)
		}
		rec[0], rec[1], rec[2] = d.ID, d.Material, d.Shape
		for j, x := range v {
			rec[3+j] = strconv.FormatFloat(x, 'g', 10, 64)
		}
		if err := writeRecord(cw, w, rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteFeatureTableFrom writes the feature table of the log r holds. A
// file that can seek (a regular file) is read in two passes: a Survey,
// which decides the feature spec (a display ID column with a gap is left
// out, as for training) and refuses what ReadLog refuses, then the rows,
// one at a time, so that its memory is the set of dig ids, whatever the
// log's length. Anything else (a pipe) is read whole first. It returns
// the log as surveyed (its Digs only when read whole), for what it found.
func WriteFeatureTableFrom(w io.Writer, r io.Reader, name string, opts ReadOptions) (*Log, error) {
	seeker, ok := r.(io.Seeker)
	if ok {
		_, err := seeker.Seek(0, io.SeekCurrent)
		ok = err == nil
	}
	if !ok {
		log, err := ReadLog(r, name, opts)
		if err != nil {
			return nil, err
		}
		return log, WriteFeatureTable(w, log, SpecOf(log))
	}
	survey, _, err := Survey(r, name, opts)
	if err != nil {
		return nil, err
	}
	if _, err := seeker.Seek(0, io.SeekStart); err != nil {
		return nil, err
	}
	// The survey refused repeated ids already; the second pass keeps no set.
	opts.AllowDuplicateIDs = true
	rd, err := NewReader(r, name, opts)
	if err != nil {
		return nil, err
	}
	return survey, WriteFeatureRows(w, name, SpecOf(survey), rd.Next)
}
