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
// naming what happened and what to do, not a crash with a stack trace.
func TestModelCutShortUnderClassify(t *testing.T) {
	b, _ := demoModel(t)
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
	if err := os.Truncate(path, 0); err != nil {
		t.Fatal(err)
	}
	if err := stream(); !errors.Is(err, ErrModelChanged) {
		t.Fatalf("after the file was cut short: %v, want ErrModelChanged", err)
	}
}
