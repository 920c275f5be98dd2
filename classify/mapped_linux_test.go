package classify

import (
	"context"
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"

	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// TestModelCutShortUnderClassify: a model file cut short while classify
// reads it where it lies (Linux drops the mapped pages past the new end,
// and reading them faults) ends the run with ErrModelChanged, an error
// naming what happened and what to do, not a crash with a stack trace; so
// does one rewritten in place (its new bytes show through the mapping),
// before any result from them is handed on. Renaming a new model over it
// changes nothing.
func TestModelCutShortUnderClassify(t *testing.T) {
	shared, log := demoModel(t)
	b := new(train.Bundle)
	*b = *shared
	Prepare(b)
	path := filepath.Join(t.TempDir(), "m.spade")
	if err := b.Save(path); err != nil {
		t.Fatal(err)
	}
	lean, err := train.LoadWith(path, train.LoadOptions{NoOutOfBag: true, Whitened: true, Mapped: true})
	if err != nil {
		t.Fatal(err)
	}
	c := New(lean, nil)
	readings := demoReadings(t)
	stream := func() error {
		i := 0
		return Stream(context.Background(), c, func() (features.Dig, error) {
			if i == len(readings) {
				return features.Dig{}, io.EOF
			}
			i++
			return readings[i-1], nil
		}, "new.csv", func(*Result) error { return nil })
	}
	if err := stream(); err != nil {
		t.Fatalf("before: %v", err)
	}
	small, err := train.TrainBundle(context.Background(), log, b.Spec, train.TrainOptions{Forest: train.Options{Trees: 5, Seed: 2}})
	if err != nil {
		t.Fatal(err)
	}
	other, err := small.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	renamed := filepath.Join(filepath.Dir(path), "new.spade")
	os.WriteFile(renamed, other, 0o644)
	if err := os.Rename(renamed, path); err != nil {
		t.Fatal(err)
	}
	if err := stream(); err != nil {
		t.Fatalf("after a model was renamed over it: %v", err)
	}

	// Again, with a model of its own to cut short and rewrite.
	if err := b.Save(path); err != nil {
		t.Fatal(err)
	}
	if lean, err = train.LoadWith(path, train.LoadOptions{NoOutOfBag: true, Whitened: true, Mapped: true}); err != nil {
		t.Fatal(err)
	}
	c = New(lean, nil)
	var emitted int
	if err := os.WriteFile(path, other, 0o644); err != nil {
		t.Fatal(err)
	}
	i := 0
	err = Stream(context.Background(), c, func() (features.Dig, error) {
		if i == len(readings) {
			return features.Dig{}, io.EOF
		}
		i++
		return readings[i-1], nil
	}, "new.csv", func(*Result) error { emitted++; return nil })
	if !errors.Is(err, ErrModelChanged) || emitted != 0 {
		t.Fatalf("rewritten in place: %v after %d results, want ErrModelChanged and none", err, emitted)
	}
	if err := os.Truncate(path, 0); err != nil {
		t.Fatal(err)
	}
	if err := stream(); !errors.Is(err, ErrModelChanged) {
		t.Fatalf("after the file was cut short: %v, want ErrModelChanged", err)
	}
}
