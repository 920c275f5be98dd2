package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

// noHazardModel is a model of the demo history with no ordnance digs left
// and no screen: it cannot warn, and must say so everywhere.
var noHazard struct {
	sync.Once
	model, log string
}

func noHazardModel(t *testing.T) (model, log string) {
	dir, _, history, _, _ := demoModel(t)
	noHazard.Do(func() {
		data, err := os.ReadFile(history)
		if err != nil {
			t.Fatal(err)
		}
		var kept []string
		for _, line := range strings.SplitAfter(string(data), "\n") {
			if !strings.Contains(line, ",ordnance,") {
				kept = append(kept, line)
			}
		}
		noHazard.log = filepath.Join(dir, "no-ordnance.csv")
		os.WriteFile(noHazard.log, []byte(strings.Join(kept, "")), 0o644)
		noHazard.model = filepath.Join(dir, "no-screen.spade")
		if _, stderr, code := spade(t, "", "train", noHazard.log, "-o", noHazard.model, "--trees", "20", "--no-screen", "-q"); code != 0 {
			t.Fatalf("train: %s", stderr)
		}
	})
	return noHazard.model, noHazard.log
}

func TestUnavailableHazardCheckStandsInEveryFormat(t *testing.T) {
	model, log := noHazardModel(t)
	_, _, _, readings, _ := demoModel(t)
	for _, format := range []string{"table", "csv", "json"} {
		// -q silences notes on stderr; the output itself must still say it.
		out, _, code := spade(t, "", "classify", "--model", model, "--format", format, "-q", readings)
		if code != 0 {
			t.Fatalf("%s: exit %d", format, code)
		}
		switch format {
		case "table", "csv":
			if !strings.Contains(strings.SplitN(out, "\n", 2)[0], "HAZARD CHECK UNAVAILABLE") {
				t.Errorf("%s: the first line does not say the hazard check is unavailable:\n%.300s", format, out)
			}
			if format == "csv" && !strings.Contains(out, ",unavailable,") {
				t.Errorf("csv: no hazard_check column saying unavailable")
			}
		case "json":
			var rs []struct {
				Hazard struct {
					Available bool   `json:"available"`
					Note      string `json:"note"`
				} `json:"hazard_check"`
			}
			if err := json.Unmarshal([]byte(out), &rs); err != nil || len(rs) == 0 {
				t.Fatalf("json: %v", err)
			}
			for _, r := range rs {
				if r.Hazard.Available || !strings.Contains(r.Hazard.Note, "cannot warn") {
					t.Errorf("json: hazard check %+v", r.Hazard)
				}
			}
		}
	}
	// train, inspect and evaluate say it too.
	out, _, _ := spade(t, "", "inspect", model)
	if !strings.Contains(out, "HAZARD CHECK UNAVAILABLE") {
		t.Errorf("inspect does not say the hazard check is unavailable:\n%s", out)
	}
	out, _, _ = spade(t, "", "inspect", "--format", "json", model)
	if !strings.Contains(out, `"available": false`) {
		t.Errorf("inspect json: %s", out)
	}
	out, _, _ = spade(t, "", "train", log, "-o", filepath.Join(t.TempDir(), "m.spade"), "--trees", "5", "--no-screen", "-q")
	if !strings.Contains(out, "HAZARD CHECK UNAVAILABLE") {
		t.Errorf("train does not say the hazard check is unavailable:\n%s", out)
	}
}

func TestScreenedModelWarnsWithoutOrdnanceInTheHistory(t *testing.T) {
	_, log := noHazardModel(t)
	dir := t.TempDir()
	model := filepath.Join(dir, "m.spade")
	out, stderr, code := spade(t, "", "train", log, "-o", model, "--trees", "20", "--label", "material", "-q")
	if code != 0 {
		t.Fatalf("train: %s", stderr)
	}
	if !strings.Contains(out, "ordnance screen on") {
		t.Errorf("train does not describe the screen:\n%s", out)
	}
	_, _, _, readings, _ := demoModel(t)
	res, _, code := spade(t, "", "classify", "--model", model, "--format", "json", readings)
	if code != 0 {
		t.Fatal("classify failed")
	}
	var rs []struct {
		Dig     string `json:"dig"`
		Caution *struct {
			Tier string `json:"tier"`
		} `json:"caution"`
		Hazard struct {
			Available bool `json:"available"`
		} `json:"hazard_check"`
		Decision struct {
			Verdict string `json:"verdict"`
		} `json:"decision"`
	}
	if err := json.Unmarshal([]byte(res), &rs); err != nil {
		t.Fatal(err)
	}
	for _, r := range rs {
		if !r.Hazard.Available {
			t.Errorf("%s: the screened --label material model cannot warn", r.Dig)
		}
		// R05 is the demo's simulated projectile: a history without
		// ordnance, trained with --label material, still holds it back.
		if r.Dig == "R05" && (r.Caution == nil || r.Decision.Verdict != "do not dig") {
			t.Errorf("R05, a simulated projectile: caution %v, verdict %q", r.Caution, r.Decision.Verdict)
		}
	}
}

func TestHazardThresholdIsAFraction(t *testing.T) {
	_, model, _, readings, _ := demoModel(t)
	dir := t.TempDir()
	for _, v := range []string{"1", "0.99", "-0.01", "0", "nan", "0.51"} {
		path := filepath.Join(dir, "v.toml")
		os.WriteFile(path, []byte("hazard_threshold = "+v+"\n"), 0o644)
		_, stderr, code := spade(t, "", "classify", "--model", model, "--values", path, readings)
		if code == 0 || !strings.Contains(stderr, "hazard_threshold is a fraction: 0.01 means 1 %") {
			t.Errorf("hazard_threshold = %s: exit %d, %q", v, code, stderr)
		}
	}
	path := filepath.Join(dir, "ok.toml")
	os.WriteFile(path, []byte("hazard_threshold = 0.5\n"), 0o644)
	if _, stderr, code := spade(t, "", "classify", "--model", model, "--values", path, readings); code != 0 {
		t.Errorf("hazard_threshold = 0.5 refused: %s", stderr)
	}
}

func TestOutputNeverOverwritesAnInput(t *testing.T) {
	dir, model, history, readings, values := demoModel(t)
	t.Chdir(dir)
	rel := filepath.Base(history)
	dotted := filepath.Join(dir, "sub", "..", filepath.Base(history))
	cases := [][]string{
		{"train", history, "-o", history},
		{"train", history, "-o", dotted},
		{"train", history, "-o", "./" + rel},
		{"classify", "--model", model, readings, "-o", model},
		{"classify", "--model", model, "--values", values, readings, "-o", values},
		{"evaluate", history, "--values", values, "-o", values},
		{"overlap", history, "--plot", history},
		{"features", history, "-o", history},
	}
	before := map[string][]byte{}
	for _, f := range []string{model, history, readings, values} {
		before[f], _ = os.ReadFile(f)
	}
	for _, c := range cases {
		_, stderr, code := spade(t, "", c...)
		if code != 2 || !strings.Contains(stderr, "names the input") {
			t.Errorf("%v: exit %d, %q", c, code, stderr)
		}
	}
	for f, b := range before {
		if now, _ := os.ReadFile(f); string(now) != string(b) {
			t.Errorf("%s was changed", f)
		}
	}
}

func TestRefusals(t *testing.T) {
	_, model, history, readings, _ := demoModel(t)
	dir := t.TempDir()
	huge := filepath.Join(dir, "huge.csv")
	os.WriteFile(huge, []byte("dig,material,shape,phase_5000,amp_5000,phase_10000,amp_10000\na,iron,nail,20,1e200,25,1\nb,gold,ring,120,0.5,130,0.6\n"), 0o644)
	cases := []struct {
		args []string
		code int
		want string
	}{
		{[]string{"evaluate", history, "--trees", "0"}, 2, "--trees must be at least 1"},
		{[]string{"overlap", history, "--trees", "-1"}, 2, "--trees must be at least 1"},
		{[]string{"classify", "--model", "/dev/zero", readings}, 1, "not a spade model file"},
		{[]string{"classify", "--model", readings, readings}, 1, "not a spade model file"},
		{[]string{"train", huge, "-o", filepath.Join(dir, "m.spade")}, 1, "huge.csv:2: fit_residual: must be finite"},
		{[]string{"classify", "--model", model, "-r", "4.3k=111.8/1e200, 9.7k=129.0/0.17, 21.7k=147.5/0.23, 36.3k=163.2/0.26, id=60"}, 1, "not a finite number"},
	}
	for _, c := range cases {
		_, stderr, code := spade(t, "", c.args...)
		if code != c.code || !strings.Contains(stderr, c.want) || strings.Contains(stderr, "goroutine") {
			t.Errorf("%v: exit %d, %q; want %d and %q", c.args, code, stderr, c.code, c.want)
		}
	}
}

func TestCompletionOffersFlagValues(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"__complete", "classify", "--format", ""}, "table\njson\ncsv\n"},
		{[]string{"__complete", "train", "--label", ""}, "material\nshape\nboth\n"},
		{[]string{"__complete", "simulate", "--scenario", ""}, "demo\nfield\nbeach\n"},
	} {
		out, _, _ := spade(t, "", c.args...)
		if !strings.HasPrefix(out, c.want) {
			t.Errorf("%v: %q", c.args, out)
		}
	}
	_, stderr, code := spade(t, "", "classify", "--model", "m.spade")
	if code != 2 || !strings.Contains(stderr, "give a readings file, - for standard input, or --reading") {
		t.Errorf("no readings: exit %d, %q", code, stderr)
	}
	_, stderr, code = spade(t, "", "classify", "--model", "m.spade", "--top", "-3", "r.csv")
	if code != 2 || !strings.Contains(stderr, "--top must be at least 1") {
		t.Errorf("--top -3: exit %d, %q", code, stderr)
	}
}

func TestTrainToStandardOutput(t *testing.T) {
	_, _, history, _, _ := demoModel(t)
	out, stderr, code := spade(t, "", "train", history, "-o", "-", "--trees", "3", "--no-screen", "-q")
	if code != 0 || !strings.HasPrefix(out, "SPADEMDL") || !strings.Contains(stderr, "Trained on") {
		t.Fatalf("exit %d, stdout %.20q, stderr %.200q", code, out, stderr)
	}
	if _, err := os.Stat("-"); err == nil {
		t.Error("a file named - was written")
	}
}

func TestOutputFolderCheckedFirst(t *testing.T) {
	_, _, history, _, _ := demoModel(t)
	for _, args := range [][]string{
		{"train", history, "-o", "/no/such/folder/m.spade"},
		{"overlap", history, "--plot", "/no/such/folder/o.png"},
	} {
		_, stderr, code := spade(t, "", args...)
		if code != 2 || !strings.Contains(stderr, "the folder /no/such/folder does not exist") {
			t.Errorf("%v: exit %d, %q", args, code, stderr)
		}
	}
}
