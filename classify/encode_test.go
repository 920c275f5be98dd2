package classify

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"strconv"
	"strings"
	"testing"
)

// TestResultWritersKeepTheirContract checks the table's framing (the
// model's warnings first, at most 80 columns, the stop said last), the CSV columns (CSVColumns,
// then p_CLASS per class, probabilities summing to 1 within 1e-3, the
// rounding of four decimals over up to ~40 classes) and that the JSON is
// a valid array of as many objects, also when empty or stopped.
func TestResultWritersKeepTheirContract(t *testing.T) {
	b, _ := demoModel(t)
	c := New(b, nil)
	digs := demoReadings(t)[:3]
	var cb, jb, tb bytes.Buffer
	cw := NewCSVWriter(&cb, b.Classes, []string{"a warning"})
	jw := NewJSONWriter(&jb)
	tw := NewTableWriter(&tb, 3, []string{"a warning"})
	for i := range digs {
		r, err := c.Classify(&digs[i])
		if err != nil {
			t.Fatal(err)
		}
		if err := cw.Write(r); err != nil {
			t.Fatal(err)
		}
		jw.Write(r)
		tw.Write(r)
	}
	cw.Stop(errors.New("digs.csv:9: bad row\nmore"))
	tw.Stop(errors.New("digs.csv:9: bad row\nmore"))
	if err := tw.Close(); err != nil {
		t.Fatal(err)
	}
	// The table: the model's warnings first, then one block a reading, each
	// in 80 columns, and the stop said last.
	table := tb.String()
	if !strings.HasPrefix(table, "!! a warning\n") || !strings.HasSuffix(table, "stopped: digs.csv:9: bad row\n") ||
		strings.Count(table, strings.Repeat("─", 78)) != len(digs) {
		t.Errorf("table framing wrong:\n%s", table)
	}
	for _, line := range strings.Split(table, "\n") {
		if n := len([]rune(line)); n > 80 {
			t.Errorf("table line of %d columns: %q", n, line)
		}
	}
	if err := cw.Close(); err != nil {
		t.Fatal(err)
	}
	jw.Close()
	text := cb.String()
	if !strings.HasPrefix(text, "# a warning\n") || !strings.HasSuffix(text, "# stopped: digs.csv:9: bad row\n") {
		t.Errorf("CSV comments wrong:\n%s", text)
	}
	rd := csv.NewReader(strings.NewReader(text))
	rd.Comment = '#'
	rows, err := rd.ReadAll()
	if err != nil || len(rows) != 4 {
		t.Fatalf("CSV: %d rows, %v", len(rows), err)
	}
	if got, want := len(rows[0]), len(CSVColumns)+len(b.Classes); got != want {
		t.Fatalf("CSV header has %d columns, want %d", got, want)
	}
	for i, col := range CSVColumns {
		if rows[0][i] != col {
			t.Errorf("column %d = %q, want %q", i, rows[0][i], col)
		}
	}
	for _, row := range rows[1:] {
		sum := 0.0
		for _, v := range row[len(CSVColumns):] {
			p, _ := strconv.ParseFloat(v, 64)
			sum += p
		}
		if sum < 0.999 || sum > 1.001 {
			t.Errorf("dig %s: probabilities sum to %.4f, want 1 within 1e-3", row[0], sum)
		}
	}
	var arr []map[string]any
	if err := json.Unmarshal(jb.Bytes(), &arr); err != nil || len(arr) != 3 {
		t.Errorf("JSON: %d objects, %v", len(arr), err)
	}
	var empty bytes.Buffer
	ej := NewJSONWriter(&empty)
	ej.Close()
	if err := json.Unmarshal(empty.Bytes(), &arr); err != nil || len(arr) != 0 {
		t.Errorf("empty JSON %q: %v", empty.String(), err)
	}
}
