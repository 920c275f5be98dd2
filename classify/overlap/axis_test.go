package overlap

import (
	"errors"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
)

func TestAxisNamesAndRefusals(t *testing.T) {
	digs, _, err := datasets.Simulate(datasets.Options{N: 20, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	log := &features.Log{Name: "sim", Freqs: datasets.DefaultFreqs, Digs: digs, HasDisplayID: true}
	axis, name, unit, err := Axis(log, "phase_9.7k")
	if err != nil || name != "phase_9700" || unit != "phase at 9700 Hz (degrees)" || axis[3] != digs[3].Readings[1].Phase() {
		t.Errorf("phase_9.7k: %v %q %q", err, name, unit)
	}
	if _, name, _, _ := Axis(log, ""); name != "display_id" {
		t.Errorf("default axis %q, want display_id", name)
	}
	log.HasDisplayID = false
	if _, name, _, _ := Axis(log, ""); name != "phase_21700" {
		t.Errorf("default axis without display IDs %q, want the middle frequency's phase", name)
	}
	for _, by := range []string{"display_id", "phase_3k", "amp_9700"} {
		if _, _, _, err := Axis(log, by); !errors.Is(err, ErrAxis) {
			t.Errorf("%s: %v", by, err)
		}
	}
}
