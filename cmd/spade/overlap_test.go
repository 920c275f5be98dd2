package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
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
	out, _, code := spade(t, "", "overlap", history, "--model", model, "--by", "phase_9.7k", "--bin", "5", "--format", "csv")
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

func TestDisplayIDOnlyLogInOverlapAndEvaluate(t *testing.T) {
	// Issue 13: a log of display IDs only works with overlap (the same bins
	// as the full log it was cut from: they need no phase) and evaluate
	// (the one number's figures alone, saying what more columns add);
	// train refuses it, naming the commands that read it.
	ids := "../../testdata/logs/display-id-only.csv"
	full, _, code := spade(t, "", "simulate", "--n", "300", "--seed", "7")
	if code != 0 {
		t.Fatal("simulate")
	}
	fullPath := filepath.Join(t.TempDir(), "full.csv")
	if err := os.WriteFile(fullPath, []byte(full), 0o644); err != nil {
		t.Fatal(err)
	}
	var a, b overlap.Result
	out, stderr, code := spade(t, "", "overlap", ids, "--format", "json")
	if code != 0 || json.Unmarshal([]byte(out), &b) != nil {
		t.Fatalf("overlap of display IDs: exit %d: %s", code, stderr)
	}
	out, _, code = spade(t, "", "overlap", fullPath, "--format", "json", "--trees", "10")
	if code != 0 || json.Unmarshal([]byte(out), &a) != nil {
		t.Fatalf("overlap of the full log: exit %d", code)
	}
	if !reflect.DeepEqual(a.Bins, b.Bins) || len(a.Ranges) != len(b.Ranges) || len(b.Notes) != 1 || len(a.Notes) != 0 {
		t.Errorf("bins differ, or notes %q / %q", b.Notes, a.Notes)
	}
	for _, r := range b.Ranges {
		if r.Resolution != nil {
			t.Errorf("range %v resolved without a model", r)
		}
	}
	table, _, _ := spade(t, "", "overlap", ids)
	if !strings.Contains(table, "note: This log has display IDs only") {
		t.Errorf("table lacks the note:\n%s", table)
	}
	if _, stderr, code := spade(t, "", "overlap", ids, "--model", "m.spade"); code != exitUsage || !strings.Contains(stderr, "a model needs phase and amplitude") {
		t.Errorf("--model with display IDs: exit %d: %s", code, stderr)
	}
	out, stderr, code = spade(t, "", "evaluate", ids, "--format", "json")
	var ev map[string]any
	if code != 0 || json.Unmarshal([]byte(out), &ev) != nil {
		t.Fatalf("evaluate: exit %d: %s", code, stderr)
	}
	if _, has := ev["model"]; has || ev["baseline_only"] != true || !strings.Contains(fmt.Sprint(ev["warnings"]), "display IDs only") {
		t.Errorf("evaluate JSON: model %v, baseline_only %v, warnings %v", ev["model"], ev["baseline_only"], ev["warnings"])
	}
	table, _, _ = spade(t, "", "evaluate", ids)
	if !strings.Contains(table, "HAZARD CHECK UNAVAILABLE") || !strings.Contains(table, "one number") || strings.Contains(table, "Per class (spade)") {
		t.Errorf("evaluate table:\n%s", table)
	}
	if _, stderr, code := spade(t, "", "train", ids, "-o", filepath.Join(t.TempDir(), "m.spade")); code != exitError || !strings.Contains(stderr, "spade overlap and spade evaluate") {
		t.Errorf("train of display IDs: exit %d: %s", code, stderr)
	}
}

func TestOverlapModelMatchesDigsByReadingsNotIDAlone(t *testing.T) {
	// Issue 14: two simulated logs share every id (SR-0001, ...). A model of
	// one must not lend its out-of-bag figures to the other's digs: refused.
	dir := t.TempDir()
	write := func(name, seed string) string {
		out, _, code := spade(t, "", "simulate", "--n", "300", "--seed", seed)
		if code != 0 {
			t.Fatal("simulate")
		}
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(out), 0o644)
		return p
	}
	a, b := write("a.csv", "1"), write("b.csv", "2")
	model := filepath.Join(dir, "a.spade")
	if _, stderr, code := spade(t, "", "train", a, "-o", model, "--trees", "30", "-q"); code != 0 {
		t.Fatal(stderr)
	}
	var own overlap.Result
	out, _, code := spade(t, "", "overlap", a, "--model", model, "--format", "json")
	if code != 0 || json.Unmarshal([]byte(out), &own) != nil || len(own.Notes) != 0 {
		t.Errorf("the model's own log: exit %d, notes %q", code, own.Notes)
	}
	_, stderr, code := spade(t, "", "overlap", b, "--model", model, "--format", "json")
	if code != exitError || !strings.Contains(stderr, "was trained on another log: ") || !strings.Contains(stderr, " digs of "+b+" share an id") {
		t.Errorf("another log with the same ids: exit %d, %s", code, stderr)
	}
	// Digs the model never saw, under ids of their own, are judged by its
	// prediction, and the result says how many.
	c := filepath.Join(dir, "c.csv")
	raw, _ := os.ReadFile(b)
	os.WriteFile(c, []byte(strings.NewReplacer("\nSR-", "\nnew-SR-", "\nHF-", "\nnew-HF-").Replace(string(raw))), 0o644)
	var fresh overlap.Result
	out, stderr, code = spade(t, "", "overlap", c, "--model", model, "--format", "json")
	if code != 0 || json.Unmarshal([]byte(out), &fresh) != nil || len(fresh.Notes) != 1 || !strings.Contains(fresh.Notes[0], "are not in the model's training digs") {
		t.Errorf("unseen digs: exit %d, notes %q, %s", code, fresh.Notes, stderr)
	}
}
