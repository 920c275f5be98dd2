package features

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestFeatureTableStreamsAFile: a file is read in two passes and gives the
// very table that reading it whole gives, for a log whose display-ID
// column has a gap (the feature is then left out, as for training, which
// only the whole log tells) and with a bad row skipped; a reader that
// cannot seek (a pipe) is read whole, to the same table.
func TestFeatureTableStreamsAFile(t *testing.T) {
	text := "dig,material,shape,display_id,phase_4300,amp_4300,phase_9700,amp_9700\n" +
		"a1,iron,nail,12,20,0.5,25,0.6\n" +
		"a2,gold,ring,,120,0.2,140,0.25\n" +
		"a3,lead,shot,55,130,0.3,-,0.35\n" +
		"a4,copper,coin,70,160,0.9,170,1.0\n"
	path := filepath.Join(t.TempDir(), "gap.csv")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	opts := ReadOptions{SkipBad: true}
	whole, err := ReadLog(strings.NewReader(text), path, opts)
	if err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	if err := WriteFeatureTable(&want, whole, SpecOf(whole)); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(want.String(), "display_id") || strings.Count(want.String(), "\n") != 4 {
		t.Fatalf("the whole log's table should leave out display_id and the bad row:\n%s", want.String())
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var got bytes.Buffer
	survey, err := WriteFeatureTableFrom(&got, f, path, opts)
	if err != nil {
		t.Fatal(err)
	}
	if got.String() != want.String() {
		t.Errorf("streamed table differs:\n%s\nwant\n%s", got.String(), want.String())
	}
	if survey.Digs != nil || len(survey.Bad) != 1 || survey.HasDisplayID {
		t.Errorf("survey kept %d digs, %d bad rows, display ID %v; want none, 1, false", len(survey.Digs), len(survey.Bad), survey.HasDisplayID)
	}
	var piped bytes.Buffer
	if _, err := WriteFeatureTableFrom(&piped, io.MultiReader(strings.NewReader(text)), path, opts); err != nil || piped.String() != want.String() {
		t.Errorf("a pipe's table differs (%v):\n%s", err, piped.String())
	}
	// A repeated id is refused by the survey, as ReadLog refuses it (the
	// bad row in the first three lines is refused first otherwise: fixed).
	dupText := strings.Replace(text, "-,0.35", "150,0.35", 1)
	dup := strings.Replace(dupText, "a4,", "a1,", 1)
	if err := os.WriteFile(path, []byte(dup), 0o644); err != nil {
		t.Fatal(err)
	}
	f2, _ := os.Open(path)
	defer f2.Close()
	if _, err := WriteFeatureTableFrom(io.Discard, f2, path, ReadOptions{}); err == nil || !strings.Contains(err.Error(), "a1") {
		t.Errorf("a repeated id: %v", err)
	}
}
