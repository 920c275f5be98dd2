package train

import (
	"context"
	"fmt"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
)

// simulated is a feature table of n simulated demo digs.
func simulated(b *testing.B, n int) *Dataset {
	digs, _, err := datasets.Simulate(datasets.Options{N: n, Seed: 42})
	if err != nil {
		b.Fatal(err)
	}
	log := &features.Log{Name: "sim", Freqs: datasets.DefaultFreqs, Digs: digs, HasDisplayID: true}
	ds, err := FromLog(log, features.NewSpec(log.Freqs, true), features.LabelBoth)
	if err != nil {
		b.Fatal(err)
	}
	return ds
}

// BenchmarkGrow times training 200 trees on 1k, 5k and 20k simulated digs
// (issue 4; the README reports the figures).
func BenchmarkGrow(b *testing.B) {
	for _, n := range []int{1000, 5000, 20000} {
		ds := simulated(b, n)
		b.Run(fmt.Sprintf("digs=%d/trees=200", n), func(b *testing.B) {
			b.ReportAllocs()
			for range b.N {
				if _, _, err := Grow(context.Background(), ds, Options{Trees: 200, Seed: 1}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkPredict times one reading's probabilities from a 200-tree forest.
func BenchmarkPredict(b *testing.B) {
	ds := simulated(b, 5000)
	f, _, _ := Grow(context.Background(), ds, Options{Trees: 200, Seed: 1})
	x := ds.Row(0, nil)
	p := make([]float64, len(ds.Classes))
	b.ResetTimer()
	for i := range b.N {
		x = ds.Row(i%ds.Rows(), x)
		p = f.Predict(x, p)
	}
}

// BenchmarkLoad times loading a 200-tree model of 5k digs (issue 4: well
// under a second).
func BenchmarkLoad(b *testing.B) {
	ds := simulated(b, 5000)
	bundle, err := TrainDataset(context.Background(), ds, features.NewSpec(datasets.DefaultFreqs, true), TrainOptions{Forest: Options{Trees: 200, Seed: 1}})
	if err != nil {
		b.Fatal(err)
	}
	data, _ := bundle.Marshal()
	b.SetBytes(int64(len(data)))
	b.ResetTimer()
	for range b.N {
		if _, err := Unmarshal(data); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLoadFormats: loading a 5,000-dig model written as format 2
// (training vectors in the JSON), format 3 (in a binary section) and format
// 4 (the compiled forest as it is, streamed), in one run.
func BenchmarkLoadFormats(b *testing.B) {
	ds := simulated(b, 5000)
	bundle, err := TrainDataset(context.Background(), ds, features.NewSpec(datasets.DefaultFreqs, true), TrainOptions{Forest: Options{Trees: 50, Seed: 1}})
	if err != nil {
		b.Fatal(err)
	}
	four, _ := bundle.Marshal()
	for name, data := range map[string][]byte{"format=2": encodeV2(bundle), "format=3": encodeV3(bundle), "format=4": four} {
		b.Run(name, func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			for range b.N {
				if _, err := Unmarshal(data); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
