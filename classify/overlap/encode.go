package overlap

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
)

// CSVColumns are the columns of WriteCSV, one row per bin.
var CSVColumns = []string{"from", "to", "digs", "entropy_bits", "ambiguous", "top_class", "top_share", "second_class", "second_share"}

// WriteCSV writes the bins as CSV (CSVColumns), with the notes first as
// comment lines ("# note: ..."), which spade's own readers skip. The
// ranges, their keepers and resolutions are in the JSON (Result's fields).
func (r *Result) WriteCSV(w io.Writer) error {
	for _, n := range r.Notes {
		if _, err := fmt.Fprintf(w, "# note: %s\n", n); err != nil {
			return err
		}
	}
	cw := csv.NewWriter(w)
	cw.Write(CSVColumns)
	for _, b := range r.Bins {
		rec := []string{Edge(b.From), Edge(b.To), strconv.Itoa(b.Digs), f4(b.Entropy), strconv.FormatBool(b.Ambiguous), b.Classes[0].Class, f4(b.Classes[0].Share)}
		if len(b.Classes) > 1 {
			rec = append(rec, b.Classes[1].Class, f4(b.Classes[1].Share))
		} else {
			rec = append(rec, "", "")
		}
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// edge writes a bin edge to two decimals at most, as typed: 84, 87.5.
// Edge writes a bin or range bound as every view of the ranges does: to
// two decimals at most, with no trailing zeros.
func Edge(v float64) string { return strconv.FormatFloat(math.Round(v*100)/100, 'f', -1, 64) }

func f4(v float64) string { return strconv.FormatFloat(v, 'f', 4, 64) }
