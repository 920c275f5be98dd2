package main

import (
	"image/png"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

func TestDemoGolden(t *testing.T) {
	// The demo writes its model and plots into its folder and nothing else.
	dir := t.TempDir()
	out := filepath.Join(dir, "demo-out")
	t.Setenv("SOURCE_DATE_EPOCH", "1796169600")
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
