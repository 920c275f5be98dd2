package main

import (
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spade-detect/spade/classify/overlap"
)

func TestOverlapWithModelGolden(t *testing.T) {
	dir, model, history, _, values := demoModel(t)
	plot := filepath.Join(dir, "overlap.svg")
	out, stderr, code := spade(t, "", "overlap", history, "--model", model, "--values", values, "--format", "json", "--plot", plot)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var r overlap.Result
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if r.By != "display_id" || len(r.Ranges) == 0 || r.Ranges[0].Resolution == nil {
		t.Fatalf("result %+v", r)
	}
	golden(t, "overlap-demo.json", out)
	table, _, _ := spade(t, "", "overlap", history, "--model", model, "--values", values)
	golden(t, "overlap-demo.table", table)
	for i, line := range strings.Split(table, "\n") {
		if len([]rune(line)) > 80 {
			t.Errorf("line %d over 80 columns: %q", i+1, line)
		}
	}
}

func TestOverlapByPhase(t *testing.T) {
	_, model, history, _, _ := demoModel(t)
	out, _, code := spade(t, "", "overlap", history, "--model", model, "--by", "phase_10k", "--bin", "5", "--format", "csv")
	if code != 0 || !strings.HasPrefix(out, "from,to,digs,entropy_bits,ambiguous") {
		t.Fatalf("exit %d: %q", code, out[:min(len(out), 200)])
	}
	// Phase bins are 5° wide: the first row's bounds differ by 5.
	row := strings.Split(strings.Split(out, "\n")[1], ",")
	if len(row) < 2 || row[0] == row[1] {
		t.Errorf("row %v", row)
	}
}

func TestOverlapUsage(t *testing.T) {
	_, model, history, _, _ := demoModel(t)
	for _, args := range [][]string{
		{"overlap", history, "--model", model, "--by", "phase_123"},
		{"overlap", history, "--model", model, "--by", "depth"},
		{"overlap", history, "--model", model, "--plot", "x.pdf"},
		{"overlap", history, "--model", model, "--label", "shape"},
	} {
		if _, stderr, code := spade(t, "", args...); code != exitUsage {
			t.Errorf("%v: exit %d, %s", args[3:], code, stderr)
		}
	}
}
