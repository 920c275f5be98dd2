package main

import (
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"github.com/spade-detect/spade/datasets"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/golden")

const goldenDir = "../../testdata/golden"

// golden compares got with testdata/golden/name, or rewrites it under -update.
func golden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join(goldenDir, name)
	if *update {
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./cmd/spade -update)", err)
	}
	if got != string(want) {
		t.Errorf("%s differs from the golden file; if the change is right, run go test ./cmd/spade -update and review the diff\n--- got\n%s", name, got)
	}
}

var demoFiles struct {
	sync.Once
	dir, model, history, readings, values string
}

// demoModel trains a 60-tree model of the demo history once, with the demo
// files written beside it.
func demoModel(t *testing.T) (dir, model, history, readings, values string) {
	demoFiles.Do(func() {
		dir, err := os.MkdirTemp("", "spade-test-")
		if err != nil {
			t.Fatal(err)
		}
		d := &demoFiles
		d.dir = dir
		d.history, d.readings, d.values = filepath.Join(dir, "history.csv"), filepath.Join(dir, "readings.csv"), filepath.Join(dir, "values.toml")
		os.WriteFile(d.history, datasets.DemoHistory, 0o644)
		os.WriteFile(d.readings, datasets.DemoReadings, 0o644)
		os.WriteFile(d.values, datasets.DemoValues, 0o644)
		d.model = filepath.Join(dir, "demo.spade")
		var out, errb bytes.Buffer
		if code := run(t.Context(), []string{"train", d.history, "-o", d.model, "--trees", "60", "--seed", "3", "-q"}, nil, &out, &errb); code != 0 {
			t.Fatalf("train: %s", errb.String())
		}
	})
	return demoFiles.dir, demoFiles.model, demoFiles.history, demoFiles.readings, demoFiles.values
}

func TestMain(m *testing.M) {
	// Re-run as the real command, for tests that need a process of its own
	// (a closed pipe, a signal): SPADE_TEST_MAIN=1 and the arguments after --.
	if os.Getenv("SPADE_TEST_MAIN") == "1" {
		for i, a := range os.Args {
			if a == "--" {
				os.Args = append([]string{"spade"}, os.Args[i+1:]...)
				break
			}
		}
		main()
	}
	code := m.Run()
	if demoFiles.dir != "" {
		os.RemoveAll(demoFiles.dir)
	}
	os.Exit(code)
}

func TestClassifyGolden(t *testing.T) {
	_, model, _, readings, values := demoModel(t)
	for _, format := range []string{"table", "json", "csv"} {
		out, stderr, code := spade(t, "", "classify", "--model", model, "--values", values, "--format", format, readings)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", format, code, stderr)
		}
		golden(t, "classify-demo."+format, out)
	}
	// The caution comes first wherever it appears in the table.
	out, _, _ := spade(t, "", "classify", "--model", model, readings)
	for _, block := range strings.Split(out, strings.Repeat("─", 78)+"\n")[1:] {
		first := strings.SplitN(block, "\n", 2)[0]
		if strings.Contains(block, "!!") && !strings.Contains(first, "LIKELY ORDNANCE") && !strings.Contains(first, "ORDNANCE CANNOT BE RULED OUT") {
			t.Errorf("caution not on the first line:\n%s", block)
		}
	}
}

func TestClassifyTableFits80Columns(t *testing.T) {
	_, model, _, readings, values := demoModel(t)
	out, _, _ := spade(t, "", "classify", "--model", model, "--values", values, readings)
	for i, line := range strings.Split(out, "\n") {
		if n := len([]rune(line)); n > 80 {
			t.Errorf("line %d has %d columns: %q", i+1, n, line)
		}
	}
}

func TestClassifyFrequencyMismatch(t *testing.T) {
	_, model, _, _, _ := demoModel(t)
	in := "dig,phase_4300,amp_4300,phase_15000,amp_15000\nx1,120,0.5,130,0.6\n"
	_, stderr, code := spade(t, in, "classify", "--model", model, "-")
	want := "spade: -:2: frequencies differ from the model's: missing 9700, 21700 and 36300 Hz; not in the model 15000 Hz\n"
	if code != exitError || stderr != want {
		t.Errorf("exit %d, stderr %q\nwant %q", code, stderr, want)
	}
	_, stderr, code = spade(t, "", "classify", "--model", model, "-r", "4.3k=120/0.5, 15k=130/0.6")
	if code != exitError || !strings.Contains(stderr, "not in the model 15000 Hz") {
		t.Errorf("inline: exit %d, stderr %q", code, stderr)
	}
}

func TestClassifyBadRows(t *testing.T) {
	_, model, _, _, _ := demoModel(t)
	head := "dig,display_id,phase_4300,amp_4300,phase_9700,amp_9700,phase_21700,amp_21700,phase_36300,amp_36300\n"
	good := "a1,60,111.8,0.10,129.0,0.17,147.5,0.23,163.2,0.26\n"
	bad := "a2,60,111.8,-0.10,129.0,0.17,147.5,0.23,163.2,0.26\n"
	_, stderr, code := spade(t, head+good+bad, "classify", "--model", model, "-")
	if code != exitError || stderr != "spade: -:3: amp_4300: must be > 0, got -0.1 (the results of the 1 reading before it are written)\n" {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
	out, stderr, code := spade(t, head+good+bad, "classify", "--model", model, "--skip-bad", "--format", "csv", "-")
	if code != 0 || strings.Count(out, "\n") != 2 || !strings.Contains(stderr, "skipped 1 bad row") {
		t.Errorf("--skip-bad: exit %d, %d lines, stderr %q", code, strings.Count(out, "\n"), stderr)
	}
	// Issue 14: 700 good rows (more than a batch) and a bad last one. Every
	// good row's result is kept, on standard output and with -o, the CSV
	// says where it stopped, the JSON stays valid, and the exit is 1.
	var many strings.Builder
	many.WriteString(head)
	for i := range 700 {
		fmt.Fprintf(&many, "g%d,60,111.8,0.10,129.0,0.17,147.5,0.23,163.2,0.26\n", i)
	}
	many.WriteString(bad)
	out, stderr, code = spade(t, many.String(), "classify", "--model", model, "--format", "csv", "-")
	if code != exitError || strings.Count(out, "\ng") != 700 || !strings.HasSuffix(out, "# stopped: -:702: amp_4300: must be > 0, got -0.1\n") || !strings.Contains(stderr, "the results of the 700 readings before it are written") {
		t.Errorf("bad last row, stdout: exit %d, %d results, tail %q, stderr %q", code, strings.Count(out, "\ng"), out[max(0, len(out)-80):], stderr)
	}
	file := filepath.Join(t.TempDir(), "out.json")
	_, stderr, code = spade(t, many.String(), "classify", "--model", model, "--format", "json", "-o", file, "-")
	var results []map[string]any
	b, _ := os.ReadFile(file)
	if code != exitError || json.Unmarshal(b, &results) != nil || len(results) != 700 {
		t.Errorf("bad last row, -o: exit %d, %d results kept, stderr %q", code, len(results), stderr)
	}
	// Readings to classify may share an id (no id set is kept).
	out, _, code = spade(t, head+good+good, "classify", "--model", model, "--format", "csv", "-")
	if code != 0 || strings.Count(out, "\na1,") != 2 {
		t.Errorf("a repeated id: exit %d\n%s", code, out)
	}
}

func TestClassifyModelErrors(t *testing.T) {
	dir, _, history, readings, _ := demoModel(t)
	_, stderr, code := spade(t, "", "classify", "--model", history, readings)
	if code != exitError || !strings.Contains(stderr, "not a spade model file") {
		t.Errorf("foreign model: exit %d, %q", code, stderr)
	}
	_, stderr, code = spade(t, "", "classify", "--model", filepath.Join(dir, "missing.spade"), readings)
	if code != exitError || !strings.Contains(stderr, "no such file") {
		t.Errorf("missing model: exit %d, %q", code, stderr)
	}
	_, _, code = spade(t, "", "classify", readings)
	if code != exitUsage {
		t.Errorf("no --model: exit %d", code)
	}
}
