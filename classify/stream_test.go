package classify

import (
	"bytes"
	"context"
	"errors"
	"io"
	"reflect"
	"strings"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// TestStreamInOrderAndStopsAtABadRow: Stream's parallel batches give, in
// input order, exactly what Classify gives one reading at a time, across a
// batch boundary; a reading that next refuses stops the stream only after
// every reading before it has been emitted.
func TestStreamInOrderAndStopsAtABadRow(t *testing.T) {
	b, log := demoModel(t)
	c := New(b, nil)
	n := StreamBatch + 37
	digs := make([]features.Dig, n)
	for i := range digs {
		digs[i] = log.Digs[(i*7)%len(log.Digs)]
		digs[i].ID = log.Digs[(i*7)%len(log.Digs)].ID + "-" + string(rune('a'+i%26))
	}
	bad := &features.ParseError{File: "r.csv", Line: n + 2, Err: features.ErrNotPositive}
	source := func(stopAt int) func() (features.Dig, error) {
		i := 0
		return func() (features.Dig, error) {
			switch {
			case i == stopAt:
				return features.Dig{}, bad
			case i == len(digs):
				return features.Dig{}, io.EOF
			}
			i++
			return digs[i-1], nil
		}
	}
	var got []*Result
	if err := Stream(context.Background(), c, source(-1), "r.csv", func(r *Result) error { got = append(got, r); return nil }); err != nil {
		t.Fatal(err)
	}
	if len(got) != n {
		t.Fatalf("%d results for %d readings", len(got), n)
	}
	one := New(b, nil)
	for i := range digs {
		want, err := one.Classify(&digs[i])
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got[i], want) {
			t.Fatalf("reading %d: stream %+v, one at a time %+v", i, got[i], want)
		}
	}
	got = got[:0]
	err := Stream(context.Background(), c, source(StreamBatch+5), "r.csv", func(r *Result) error { got = append(got, r); return nil })
	if !errors.Is(err, features.ErrNotPositive) || len(got) != StreamBatch+5 {
		t.Errorf("bad row after %d readings: %d emitted, error %v", StreamBatch+5, len(got), err)
	}
	// StreamTo keeps the results before the bad row, and says where it
	// stopped, last.
	var buf bytes.Buffer
	written, err := StreamTo(context.Background(), c, source(7), "r.csv", NewCSVWriter(&buf, b.Classes, nil), nil)
	rows := strings.Split(strings.TrimSpace(buf.String()), "\n")
	if !errors.Is(err, features.ErrNotPositive) || written != 7 || len(rows) != 1+7+1 || !strings.HasPrefix(rows[8], "# stopped: r.csv:") {
		t.Errorf("StreamTo stopped at reading 8: %d written, error %v, output\n%s", written, err, buf.String())
	}
	buf.Reset()
	if written, err := StreamTo(context.Background(), c, source(0), "r.csv", NewCSVWriter(&buf, b.Classes, nil), nil); written != 0 || err == nil || buf.Len() != 0 {
		t.Errorf("StreamTo on a bad first row: %d written, error %v, output %q (want nothing kept)", written, err, buf.String())
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if err := Stream(ctx, c, source(-1), "r.csv", func(*Result) error { return nil }); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}

// TestStoredNoveltyReference: a model that stores its novelty reference
// (as spade train writes it) gives the very results of one that does not,
// and the reference survives the model file exactly.
func TestStoredNoveltyReference(t *testing.T) {
	b, _ := demoModel(t)
	plain := New(b, nil)
	stored := *b
	stored.NoveltyReference = ReferenceScores(b)
	data, err := stored.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	back, err := train.Unmarshal(data)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(back.NoveltyReference, plain.reference) {
		t.Fatalf("stored reference of %d scores differs from the computed one of %d", len(back.NoveltyReference), len(plain.reference))
	}
	fast := New(back, nil)
	for _, d := range demoReadings(t) {
		a, _ := plain.Classify(&d)
		b, _ := fast.Classify(&d)
		if !reflect.DeepEqual(a, b) {
			t.Errorf("%s: %+v against %+v", d.ID, a.Novelty, b.Novelty)
		}
	}
}

// BenchmarkNewClassifier: classify's start-up with a 5,000-dig model, with
// the novelty reference stored in the model and computed at load.
func BenchmarkNewClassifier(b *testing.B) {
	digs, _, err := datasets.Simulate(datasets.Options{N: 5000, Seed: 42})
	if err != nil {
		b.Fatal(err)
	}
	log := &features.Log{Name: "sim", Freqs: datasets.DefaultFreqs, Digs: digs, HasDisplayID: true}
	bundle, err := train.TrainBundle(context.Background(), log, features.NewSpec(log.Freqs, true), train.TrainOptions{NoScreen: true, Forest: train.Options{Trees: 20, Seed: 1}})
	if err != nil {
		b.Fatal(err)
	}
	b.Run("reference=computed", func(b *testing.B) {
		for range b.N {
			New(bundle, nil)
		}
	})
	stored := *bundle
	stored.NoveltyReference = ReferenceScores(bundle)
	b.Run("reference=stored", func(b *testing.B) {
		for range b.N {
			New(&stored, nil)
		}
	})
}
