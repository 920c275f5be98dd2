package main

import (
	"bufio"
	"bytes"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

func TestDemoGolden(t *testing.T) {
	// The demo writes its model and plots into its folder and nothing else.
	dir := t.TempDir()
	out := filepath.Join(dir, "demo-out")
	stdout, stderr, code := spade(t, "", "demo", "-o", out, "--trees", "40")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	golden(t, "demo.txt", strings.ReplaceAll(stdout, out, "DIR"))
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 || entries[0].Name() != "demo-out" {
		t.Errorf("demo wrote outside its folder: %v", entries)
	}
	files, _ := os.ReadDir(out)
	var names []string
	for _, f := range files {
		names = append(names, f.Name())
	}
	want := []string{"confusion.png", "demo.spade", "overlap.png", "reliability.png", "spectra.png"}
	if !slices.Equal(names, want) {
		t.Errorf("files %v, want %v", names, want)
	}
	for _, n := range want[:1] {
		f, _ := os.Open(filepath.Join(out, n))
		if _, err := png.Decode(f); err != nil {
			t.Errorf("%s: %v", n, err)
		}
		f.Close()
	}
	for _, want := range []string{"one number", "Dig saving", "LIKELY ORDNANCE", "ORDNANCE CANNOT BE RULED OUT", "ordnance screen", "unfamiliar", "what it really was", "Safety"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("demo output lacks %q", want)
		}
	}
	for i, line := range strings.Split(stdout, "\n") {
		if len([]rune(line)) > 80 {
			t.Errorf("line %d over 80 columns: %q", i+1, line)
		}
	}
}

// TestDemoFinishesWhenItsPipeCloses runs the demo as its own process with
// its output read for one line and then closed (spade demo | head -1): the
// model and the four plots must still be written, and nothing on stderr.
func TestDemoFinishesWhenItsPipeCloses(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the whole demo in a child process")
	}
	dir := t.TempDir()
	cmd := exec.Command(os.Args[0], "-test.run=^$", "--", "demo", "-o", dir, "--trees", "20", "-q")
	cmd.Env = append(os.Environ(), "SPADE_TEST_MAIN=1")
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	if _, err := bufio.NewReader(out).ReadString('\n'); err != nil {
		t.Fatal(err)
	}
	out.Close()
	if err := cmd.Wait(); err != nil {
		t.Fatalf("demo with a closed pipe: %v (stderr %q)", err, stderr.String())
	}
	for _, name := range []string{"demo.spade", "overlap.png", "reliability.png", "confusion.png", "spectra.png"} {
		if fi, err := os.Stat(filepath.Join(dir, name)); err != nil || fi.Size() == 0 {
			t.Errorf("%s not written after the pipe closed: %v", name, err)
		}
	}
	if stderr.Len() > 0 {
		t.Errorf("stderr: %q", stderr.String())
	}
}
