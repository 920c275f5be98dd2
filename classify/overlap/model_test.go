package overlap

import (
	"context"
	"errors"
	"slices"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

func TestHeldOutMatchesByReadingsNotIDAlone(t *testing.T) {
	// The model's own log gets its out-of-bag probabilities exactly; a log
	// of other digs under the same ids is refused; digs under new ids get
	// the model's prediction and a note.
	sim := func(seed uint64) (*features.Log, *train.Dataset) {
		digs, _, err := datasets.Simulate(datasets.Options{N: 200, Seed: seed})
		if err != nil {
			t.Fatal(err)
		}
		log := &features.Log{Name: "sim", Freqs: datasets.DefaultFreqs, Digs: digs, HasDisplayID: true}
		ds, err := train.FromLog(log, features.NewSpec(log.Freqs, true), features.LabelBoth)
		if err != nil {
			t.Fatal(err)
		}
		return log, ds
	}
	log, ds := sim(1)
	b, err := train.TrainBundle(context.Background(), log, features.NewSpec(log.Freqs, true), train.TrainOptions{Label: features.LabelBoth, NoScreen: true, Forest: train.Options{Trees: 20, Seed: 1}})
	if err != nil {
		t.Fatal(err)
	}
	probs, notes, err := HeldOut(b, log, ds)
	if err != nil || len(notes) != 0 {
		t.Fatalf("own log: %v, notes %q", err, notes)
	}
	for i := range log.Digs {
		j := slices.Index(b.Training.IDs, log.Digs[i].ID)
		for k, c := range b.Classes {
			if probs[i][slices.Index(ds.Classes, c)] != b.Training.OutOfBag[j][k] {
				t.Fatalf("dig %d: held-out %v, out of bag %v", i, probs[i], b.Training.OutOfBag[j])
			}
		}
	}
	other, ods := sim(2)
	if _, _, err := HeldOut(b, other, ods); !errors.Is(err, ErrOtherLog) {
		t.Errorf("another log under the same ids: %v", err)
	}
	for i := range other.Digs {
		other.Digs[i].ID = "new-" + other.Digs[i].ID
	}
	if _, notes, err := HeldOut(b, other, ods); err != nil || len(notes) != 1 {
		t.Errorf("new ids: %v, notes %q", err, notes)
	}
}

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
