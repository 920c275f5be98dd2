package features

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// WriteOptions says how a log is written.
type WriteOptions struct {
	// Components writes x_<hz>/r_<hz> instead of phase_<hz>/amp_<hz>.
	Components bool
	// PhaseDecimals and AmpDigits round the values as an instrument would
	// display them; -1 writes every digit, so that reading the file back
	// gives the same float64 values.
	PhaseDecimals int
	AmpDigits     int
	// Labels writes the material and shape columns.
	Labels bool
	// Notes, when not nil, adds a free-text "note" column, one per dig; a
	// reader keeps it out of the model.
	Notes []string
}

// WriteCSV writes digs as a dig log in the CSV form of the contract.
// Every dig must have one reading per frequency in freqs.
func WriteCSV(w io.Writer, freqs []int, digs []Dig, opts WriteOptions) error {
	cw := csv.NewWriter(w)
	header := []string{"dig", "site", "date"}
	if opts.Labels {
		header = append(header, "material", "shape")
	}
	header = append(header, "depth_cm", "display_id")
	a, b := "phase_", "amp_"
	if opts.Components {
		a, b = "x_", "r_"
	}
	ground := false
	for i := range digs {
		if digs[i].Ground != nil {
			ground = true
			break
		}
	}
	for _, hz := range freqs {
		header = append(header, a+strconv.Itoa(hz), b+strconv.Itoa(hz))
	}
	if ground {
		for _, hz := range freqs {
			header = append(header, "ground_"+a+strconv.Itoa(hz), "ground_"+b+strconv.Itoa(hz))
		}
	}
	if opts.Notes != nil {
		if len(opts.Notes) != len(digs) {
			panic("features: length mismatch")
		}
		header = append(header, "note")
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	rec := make([]string, 0, len(header))
	for i := range digs {
		d := &digs[i]
		if len(d.Readings) != len(freqs) || (d.Ground != nil && len(d.Ground) != len(freqs)) {
			panic("features: length mismatch")
		}
		rec = append(rec[:0], d.ID, d.Site, d.Date)
		if opts.Labels {
			rec = append(rec, d.Material, d.Shape)
		}
		rec = append(rec, optional(d.DepthCM, 1), optional(d.DisplayID, -1))
		rec = opts.appendReadings(rec, d.Readings)
		if ground {
			if d.Ground == nil {
				for range 2 * len(freqs) {
					rec = append(rec, "")
				}
			} else {
				rec = opts.appendReadings(rec, d.Ground)
			}
		}
		if opts.Notes != nil {
			rec = append(rec, opts.Notes[i])
		}
		if err := writeRecord(cw, w, rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// writeRecord writes one row. A first field that starts with "#" (a dig id
// from JSON Lines, say) is quoted by hand, as encoding/csv does not quote
// it: unquoted, the line would read back as a comment and the dig be lost.
func writeRecord(cw *csv.Writer, w io.Writer, rec []string) error {
	if len(rec) < 2 || !strings.HasPrefix(rec[0], "#") {
		return cw.Write(rec)
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	if _, err := io.WriteString(w, `"`+strings.ReplaceAll(rec[0], `"`, `""`)+`",`); err != nil {
		return err
	}
	return cw.Write(rec[1:])
}

func (o WriteOptions) appendReadings(rec []string, rs []Reading) []string {
	for _, r := range rs {
		if o.Components {
			rec = append(rec, fmtFloat(r.X, o.AmpDigits), fmtFloat(r.R, o.AmpDigits))
			continue
		}
		rec = append(rec, strconv.FormatFloat(r.Phase(), 'f', o.PhaseDecimals, 64), fmtFloat(r.Amp(), o.AmpDigits))
	}
	return rec
}

// fmtFloat writes v with the given significant digits (-1: all).
func fmtFloat(v float64, digits int) string {
	if digits < 0 {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	return strconv.FormatFloat(v, 'g', digits, 64)
}

// optional writes NaN as an empty cell.
func optional(v float64, decimals int) string {
	if math.IsNaN(v) {
		return ""
	}
	if decimals < 0 {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	return strconv.FormatFloat(v, 'f', decimals, 64)
}

// String is a one-line description, for messages.
func (r Reading) String() string {
	return fmt.Sprintf("%d Hz: %.1f° × %.3g", r.Hz, r.Phase(), r.Amp())
}
