package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/train"
	"gonum.org/v1/gonum/floats/scalar"
)

// spade runs one command line in-process.
func spade(t *testing.T, stdin string, args ...string) (stdout, stderr string, code int) {
	t.Helper()
	var out, errb bytes.Buffer
	code = run(context.Background(), args, strings.NewReader(stdin), &out, &errb)
	return out.String(), errb.String(), code
}

func TestResponseJSONSphereDCLimit(t *testing.T) {
	// A non-conducting permeable sphere: X = 2(μr-1)/(μr+2) at every
	// frequency (Wait 1951): μr = 4 gives 1.
	out, _, code := spade(t, "", "response", "--shape", "sphere", "--mur", "4", "--freqs", "1k,15k", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	var rows []datasets.ResponseRow
	if err := json.Unmarshal([]byte(out), &rows); err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 || rows[1].Hz != 15000 || !scalar.EqualWithinAbs(rows[0].X, 1, 1e-12) || math.Abs(rows[0].Phase) > 1e-9 {
		t.Errorf("rows %+v", rows)
	}
}

func TestResponseCopperCoin(t *testing.T) {
	// "What would a 20 mm copper coin read?": a good conductor, phase above
	// 160° at 5 kHz and rising (common practice, no source).
	out, _, code := spade(t, "", "response", "--shape", "disc", "--material", "copper", "--diameter-mm", "20", "--format", "json")
	var rows []datasets.ResponseRow
	if code != 0 || json.Unmarshal([]byte(out), &rows) != nil {
		t.Fatalf("exit %d: %s", code, out)
	}
	for i, r := range rows {
		if r.Phase < 160 || (i > 0 && r.Phase <= rows[i-1].Phase) || r.R < 0 {
			t.Errorf("row %+v", r)
		}
	}
}

func TestResponseUsageErrors(t *testing.T) {
	for _, args := range [][]string{
		{"response", "--shape", "cube", "--material", "gold"},
		{"response", "--material", "unobtainium"},
		{"response", "--shape", "sphere"},
		{"response", "--freqs", "abc", "--material", "gold"},
	} {
		_, stderr, code := spade(t, "", args...)
		if code != exitUsage || !strings.HasPrefix(stderr, "spade: ") || strings.Contains(stderr, "goroutine") {
			t.Errorf("%v: exit %d, stderr %q", args, code, stderr)
		}
	}
}

func TestSimulateIsDeterministicAndReadable(t *testing.T) {
	a, _, code := spade(t, "", "simulate", "--n", "50", "--seed", "9", "--freqs", "4k,12k,36k")
	b, _, _ := spade(t, "", "simulate", "--n", "50", "--seed", "9", "--freqs", "4k,12k,36k")
	if code != 0 || a != b {
		t.Fatalf("exit %d, same output %v", code, a == b)
	}
	out, stderr, code := spade(t, a, "features", "-")
	if code != 0 {
		t.Fatalf("features: exit %d, %s", code, stderr)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 51 || !strings.HasPrefix(lines[0], "dig,material,shape,phase_4000,phase_12000,phase_36000,logamp_12000") {
		t.Errorf("%d lines, header %q", len(lines), lines[0])
	}
}

func TestBadLogExitsOneWithPosition(t *testing.T) {
	_, stderr, code := spade(t, "", "features", "../../testdata/logs/bad/amp-negative.csv")
	if code != exitError || stderr != "spade: ../../testdata/logs/bad/amp-negative.csv:2: amp_5000: must be > 0, got -0.3\n" {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
}

func TestEvaluateWithoutValues(t *testing.T) {
	// No --values and no --keep: the report has no dig-saving figures, and
	// nothing breaks (a nil values file once reached a method through an
	// interface).
	log, _, _ := spade(t, "", "simulate", "--n", "120", "--seed", "4")
	out, stderr, code := spade(t, log, "evaluate", "-", "--trees", "10", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var ev map[string]any
	if err := json.Unmarshal([]byte(out), &ev); err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{"model", "baseline", "folds", "seed", "digs", "classes"} {
		if _, ok := ev[key]; !ok {
			t.Errorf("JSON lacks %q", key)
		}
	}
	if _, ok := ev["dig_saving"]; ok {
		t.Error("dig_saving without keepers")
	}
	out, _, code = spade(t, log, "evaluate", "-", "--trees", "10", "--keep", "gold,silver,coin")
	if code != 0 || !strings.Contains(out, "Dig saving") {
		t.Errorf("--keep: exit %d", code)
	}
}

func TestInterruptedTrainWritesNothing(t *testing.T) {
	// Ctrl-C cancels the context: the run stops with exit 130, says so in one
	// line, and leaves no model and no temporary file behind.
	dir := t.TempDir()
	log, _, _ := spade(t, "", "simulate", "--n", "300", "--seed", "2")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var out, errb bytes.Buffer
	model := filepath.Join(dir, "m.spade")
	code := run(ctx, []string{"train", "-", "-o", model}, strings.NewReader(log), &out, &errb)
	if code != exitInterrupt || errb.String() != "spade: interrupted; nothing was written\n" {
		t.Errorf("exit %d, stderr %q", code, errb.String())
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("left behind: %v", entries)
	}
}

func TestFloatFlagsMustBeFinite(t *testing.T) {
	for _, args := range [][]string{
		{"features", "../../testdata/logs/spreadsheet.csv", "--phase-offset", "nan"},
		{"response", "--material", "gold", "--diameter-mm", "inf"},
		{"overlap", "../../testdata/logs/spreadsheet.csv", "--min-top-share", "NaN"},
	} {
		_, stderr, code := spade(t, "", args...)
		if code != exitUsage || !strings.Contains(stderr, "must be a finite number") {
			t.Errorf("%v: exit %d, %q", args, code, stderr)
		}
	}
}

// TestMessagesAPersonCanActOn checks the wording of usage and open errors
// against what issue 13 asks for: what the command takes and what it got,
// the command's own help, and no Go internals (strconv, arg(s), [a b]).
func TestMessagesAPersonCanActOn(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		args []string
		code int
		want []string
	}{
		{[]string{"train"}, exitUsage, []string{"spade train takes LOG -o MODEL; it was given nothing", "Run 'spade train --help' for usage."}},
		{[]string{"evaluate", "a", "b"}, exitUsage, []string{`it was given 2 arguments ("a" and "b")`, "Run 'spade evaluate --help'"}},
		{[]string{"demo", "x"}, exitUsage, []string{`spade demo takes no arguments; it was given "x"`}},
		{[]string{"train", "--trees", "x", "log.csv"}, exitUsage, []string{`--trees wants a whole number, got "x"`}},
		{[]string{"evaluate", "--tres", "5", "log.csv"}, exitUsage, []string{"unknown flag: --tres (did you mean --trees?)"}},
		{[]string{"classify", "--model", filepath.Join(dir, "nosuch.spade"), "r.csv"}, exitError, []string{"cannot read model " + filepath.Join(dir, "nosuch.spade") + ": no such file or directory"}},
	} {
		_, stderr, code := spade(t, "", c.args...)
		if code != c.code {
			t.Errorf("%v: exit %d, want %d (%s)", c.args, code, c.code, stderr)
		}
		for _, w := range c.want {
			if !strings.Contains(stderr, w) {
				t.Errorf("%v: stderr %q lacks %q", c.args, stderr, w)
			}
		}
		for _, bad := range []string{"strconv.", "arg(s)", "train: train", "open " + dir} {
			if strings.Contains(stderr, bad) {
				t.Errorf("%v: stderr %q has %q", c.args, stderr, bad)
			}
		}
	}
}

func TestFileFlagsCompleteToFiles(t *testing.T) {
	// --model completes to .spade files, --values to .toml (cobra's
	// directive 8 filters by extension), --format to its words.
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"__complete", "classify", "--model", ""}, "spade\n:8\n"},
		{[]string{"__complete", "evaluate", "--values", ""}, "toml\n:8\n"},
		{[]string{"__complete", "classify", "--format", ""}, "table\njson\ncsv\n:4\n"},
	} {
		out, _, _ := spade(t, "", c.args...)
		if !strings.HasPrefix(out, c.want) {
			t.Errorf("%v: %q, want %q first", c.args, out, c.want)
		}
	}
}

func TestMaxSamplesFlag(t *testing.T) {
	// Through the command: the model records its bootstrap size.
	dir := t.TempDir()
	log := filepath.Join(dir, "h.csv")
	if _, _, code := spade(t, "", "simulate", "--n", "300", "--seed", "4", "-o", log); code != 0 {
		t.Fatal("simulate failed")
	}
	if _, stderr, code := spade(t, "", "train", log, "-o", filepath.Join(dir, "bad.spade"), "--max-samples", "20%"); code != exitUsage || !strings.Contains(stderr, "--max-samples") {
		t.Errorf("--max-samples 20%%: exit %d, %s", code, stderr)
	}
	model := filepath.Join(dir, "m.spade")
	if _, stderr, code := spade(t, "", "train", log, "-o", model, "--trees", "5", "--no-screen", "--max-samples", "0.5", "-q"); code != 0 {
		t.Fatal(stderr)
	}
	b, err := train.Load(model)
	if err != nil || b.Summary.MaxSamples != 150 {
		t.Errorf("max samples %d, %v", b.Summary.MaxSamples, err)
	}
}
