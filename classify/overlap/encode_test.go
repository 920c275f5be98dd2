package overlap

import (
	"bytes"
	"encoding/csv"
	"strings"
	"testing"
)

func TestWriteCSVOneRowPerBin(t *testing.T) {
	r := &Result{Notes: []string{"a note"}, Bins: []Bin{
		{From: 10, To: 12.5, Digs: 3, Entropy: 0.9183, Classes: []Share{{Class: "iron/nail", Share: 2.0 / 3}, {Class: "gold/ring", Share: 1.0 / 3}}},
		{From: 12.5, To: 15, Digs: 1, Classes: []Share{{Class: "iron/nail", Share: 1}}},
	}}
	var b bytes.Buffer
	if err := r.WriteCSV(&b); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(b.String(), "# note: a note\n") {
		t.Errorf("notes not first: %q", b.String())
	}
	rd := csv.NewReader(&b)
	rd.Comment = '#'
	rows, err := rd.ReadAll()
	if err != nil || len(rows) != 3 {
		t.Fatalf("%d rows, %v", len(rows), err)
	}
	want := [][]string{CSVColumns,
		{"10", "12.5", "3", "0.9183", "false", "iron/nail", "0.6667", "gold/ring", "0.3333"},
		{"12.5", "15", "1", "0.0000", "false", "iron/nail", "1.0000", "", ""}}
	for i := range want {
		if strings.Join(rows[i], ",") != strings.Join(want[i], ",") {
			t.Errorf("row %d = %v, want %v", i, rows[i], want[i])
		}
	}
}
