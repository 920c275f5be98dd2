package classify

import (
	"context"
	"errors"
	"io"
	"reflect"
	"testing"

	"github.com/spade-detect/spade/features"
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
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if err := Stream(ctx, c, source(-1), "r.csv", func(*Result) error { return nil }); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}
