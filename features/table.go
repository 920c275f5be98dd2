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
	cw := csv.NewWriter(w)
	header := append([]string{"dig", "material", "shape"}, spec.Names...)
	if err := cw.Write(header); err != nil {
		return err
	}
	rec := make([]string, len(header))
	var v []float64
	for i := range log.Digs {
		d := &log.Digs[i]
		var err error
		if v, _, err = spec.Extract(d, v); err != nil {
			return DigError(log.Name, d, err)
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
