package train

import (
	"context"
	"errors"
	"slices"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
)

func TestHeldOutMatchesByReadingsNotIDAlone(t *testing.T) {
	// The model's own log gets its out-of-bag probabilities exactly; a log
	// of other digs under the same ids is refused; digs under new ids get
	// the model's prediction and a note.
	sim := func(seed uint64) (*features.Log, *Dataset) {
		digs, _, err := datasets.Simulate(datasets.Options{N: 200, Seed: seed})
		if err != nil {
			t.Fatal(err)
		}
		log := &features.Log{Name: "sim", Freqs: datasets.DefaultFreqs, Digs: digs, HasDisplayID: true}
		ds, err := FromLog(log, features.NewSpec(log.Freqs, true), features.LabelBoth)
		if err != nil {
			t.Fatal(err)
		}
		return log, ds
	}
	log, ds := sim(1)
	b, err := TrainBundle(context.Background(), log, features.NewSpec(log.Freqs, true), TrainOptions{Label: features.LabelBoth, NoScreen: true, Forest: Options{Trees: 20, Seed: 1}})
	if err != nil {
		t.Fatal(err)
	}
	probs, notes, err := b.HeldOut(log, ds)
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
	if _, _, err := b.HeldOut(other, ods); !errors.Is(err, ErrOtherLog) {
		t.Errorf("another log under the same ids: %v", err)
	}
	for i := range other.Digs {
		other.Digs[i].ID = "new-" + other.Digs[i].ID
	}
	if _, notes, err := b.HeldOut(other, ods); err != nil || len(notes) != 1 {
		t.Errorf("new ids: %v, notes %q", err, notes)
	}
}
