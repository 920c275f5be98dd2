package datasets

import (
	"bytes"
	"flag"
	"os"
	"strings"
	"testing"

	"github.com/spade-detect/spade/features"
)

var update = flag.Bool("update", false, "rewrite the embedded demo files")

func TestDemoFilesRegenerate(t *testing.T) {
	// The embedded demo is what the simulator makes with the demo's seeds,
	// byte for byte.
	for _, c := range []struct {
		name     string
		embedded []byte
		gen      func() ([]byte, error)
	}{
		{DemoHistoryName, DemoHistory, GenerateDemoHistory},
		{DemoReadingsName, DemoReadings, GenerateDemoReadings},
	} {
		got, err := c.gen()
		if err != nil {
			t.Fatal(err)
		}
		again, _ := c.gen()
		if !bytes.Equal(got, again) {
			t.Fatalf("%s: two generations differ", c.name)
		}
		if *update {
			if err := os.WriteFile(c.name, got, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		if !bytes.Equal(got, c.embedded) {
			t.Errorf("%s is not what the simulator makes; run go test ./datasets -update and review the diff", c.name)
		}
	}
}

func TestDemoHistoryReads(t *testing.T) {
	log, err := features.ReadLog(bytes.NewReader(DemoHistory), DemoHistoryName, features.ReadOptions{Require: features.LabelBoth})
	if err != nil {
		t.Fatal(err)
	}
	if len(log.Digs) != DemoN || !log.HasDisplayID || !log.HasGround {
		t.Errorf("%d digs, display ID %v, ground %v", len(log.Digs), log.HasDisplayID, log.HasGround)
	}
	classes := map[string]int{}
	for i := range log.Digs {
		classes[log.Digs[i].Class(features.LabelBoth)]++
	}
	for _, k := range Catalogue {
		if classes[k.Class()] < 10 {
			t.Errorf("class %s has %d digs", k.Class(), classes[k.Class()])
		}
	}
	rd, err := features.ReadLog(bytes.NewReader(DemoReadings), DemoReadingsName, features.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(rd.Digs) != len(demoReadings) || rd.Digs[0].Labelled(features.LabelBoth) {
		t.Errorf("readings: %d rows, first labelled %v", len(rd.Digs), rd.Digs[0].Labelled(features.LabelBoth))
	}
}

func TestDemoReadingNotesNameEveryReading(t *testing.T) {
	// Every embedded demo reading says what it really was (the demo prints
	// it beside the result), and the notes come from the simulator.
	notes := DemoReadingNotes()
	rows := 0
	for _, l := range strings.Split(string(DemoReadings), "\n") {
		if l != "" && !strings.HasPrefix(l, "#") && !strings.HasPrefix(l, "dig,") {
			rows++
		}
	}
	if len(notes) != rows || rows == 0 {
		t.Fatalf("%d notes for %d readings", len(notes), rows)
	}
	for id, n := range notes {
		if !strings.HasPrefix(n, "simulated: ") {
			t.Errorf("%s: note %q does not say it is simulated", id, n)
		}
	}
}
