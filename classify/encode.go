package classify

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
)

// A ResultWriter writes results as they come, in one view: JSON (an array
// of Result objects), CSV (CSVColumns, then p_CLASS for every class), or
// a table for a person (TableWriter). Stop ends the results with the error that
// stopped the run, where a person reads them; Close finishes the view.
type ResultWriter interface {
	Write(*Result) error
	Stop(err error)
	Close() error
}

var (
	_ ResultWriter = (*JSONWriter)(nil)
	_ ResultWriter = (*CSVWriter)(nil)
	_ ResultWriter = (*TableWriter)(nil)
)

// CSVColumns are the first columns of classify's CSV, in order; a column
// p_CLASS per class of the model follows them. Warnings about the model as
// a whole come before the header as comment lines ("# ..."), which spade's
// own readers skip.
var CSVColumns = []string{"dig", "caution", "hazard_check", "hazard_probability", "history_hazard", "screen_score",
	"top_class", "top_probability", "verdict", "expected_value", "novelty_percentile", "unfamiliar", "dig_to_learn",
	"nearest_dig", "nearest_class", "nearest_distance"}

// JSONWriter writes results as one JSON array, an element a line, valid
// even when the run stops part way (the exit status then says so).
type JSONWriter struct {
	w *bufio.Writer
	n int
}

// NewJSONWriter writes a JSON array of results to w.
func NewJSONWriter(w io.Writer) *JSONWriter { return &JSONWriter{w: bufio.NewWriter(w)} }

func (j *JSONWriter) Write(r *Result) error {
	b, err := json.Marshal(r)
	if err != nil {
		return err
	}
	if j.n == 0 {
		j.w.WriteString("[\n")
	} else {
		j.w.WriteString(",\n")
	}
	j.n++
	_, err = j.w.Write(b)
	return err
}

// Stop leaves the array valid; JSON has no place for a remark.
func (j *JSONWriter) Stop(error) {}

func (j *JSONWriter) Close() error {
	if j.n == 0 {
		j.w.WriteString("[")
	}
	j.w.WriteString("\n]\n")
	return j.w.Flush()
}

// CSVWriter writes results as CSV rows, with CSVColumns and a probability
// column per class.
type CSVWriter struct {
	w        *bufio.Writer
	cw       *csv.Writer
	classes  []string
	warnings []string
}

// NewCSVWriter writes results of a model with these classes; warnings
// (Classifier.Warnings) head the file as comment lines.
func NewCSVWriter(w io.Writer, classes, warnings []string) *CSVWriter {
	return &CSVWriter{w: bufio.NewWriter(w), classes: classes, warnings: warnings}
}

func (c *CSVWriter) header() {
	if c.cw != nil {
		return
	}
	for _, w := range c.warnings {
		fmt.Fprintf(c.w, "# %s\n", w)
	}
	c.cw = csv.NewWriter(c.w)
	header := append([]string(nil), CSVColumns...)
	for _, cl := range c.classes {
		header = append(header, "p_"+cl)
	}
	c.cw.Write(header)
}

func (c *CSVWriter) Write(r *Result) error {
	c.header()
	h := r.Hazard
	check := "available"
	if !h.Available {
		check = "unavailable"
	}
	rec := []string{r.Dig, h.Tier, check, f4(h.Probability), f4(h.History), f4(h.Screen), r.Top.Class, f4(r.Top.Probability),
		string(r.Decision.Verdict), f4(r.Decision.ExpectedValue), f4(r.Novelty.Percentile),
		strconv.FormatBool(r.Novelty.Unfamiliar), strconv.FormatBool(r.Learn.Worth)}
	if len(r.Neighbours) > 0 {
		rec = append(rec, r.Neighbours[0].Dig, r.Neighbours[0].Class, f4(r.Neighbours[0].Distance))
	} else {
		rec = append(rec, "", "", "")
	}
	for _, cl := range c.classes {
		rec = append(rec, f4(r.Probabilities[cl]))
	}
	return c.cw.Write(rec)
}

// Stop ends the file with a comment line naming what stopped it.
func (c *CSVWriter) Stop(err error) {
	if c.cw != nil {
		c.cw.Flush()
	}
	fmt.Fprintf(c.w, "# stopped: %s\n", firstLine(err.Error()))
}

func (c *CSVWriter) Close() error {
	if c.cw != nil {
		c.cw.Flush()
		if err := c.cw.Error(); err != nil {
			return err
		}
	}
	return c.w.Flush()
}

// f4 writes a figure with four decimals, as every CSV of spade's does.
func f4(v float64) string { return strconv.FormatFloat(v, 'f', 4, 64) }

func firstLine(s string) string {
	for i := 0; i < len(s); i++ {
		if s[i] == '\n' {
			return s[:i]
		}
	}
	return s
}
