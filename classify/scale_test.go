package classify

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// Issue 15's benchmarks: the cost of an answer with a club's pooled history
// against a personal one. Run them in one go, so that the ratios hold on a
// noisy machine:
//
//	go test -run XXX -bench Scale -benchtime 2000x ./classify/
//
// The models (200 trees and the ordnance screen, as spade train makes them,
// on simulated demo digs of seed 7) are trained the first time and kept in
// the system's temporary folder, keyed by model format, size and seed:
// the 100,000-dig one takes a minute or two to train.

// scaleModel is the path of a trained, prepared n-dig model.
func scaleModel(b *testing.B, n int) string {
	dir := filepath.Join(os.TempDir(), "spade-bench")
	path := filepath.Join(dir, fmt.Sprintf("format%d-digs%d-seed7.spade", train.FormatVersion, n))
	if _, err := train.Load(path); err == nil {
		return path
	} else if !errors.Is(err, os.ErrNotExist) {
		b.Logf("training again: %v", err)
	}
	digs, _, err := datasets.Simulate(datasets.Options{N: n, Seed: 7})
	if err != nil {
		b.Fatal(err)
	}
	log := &features.Log{Name: "sim", Freqs: datasets.DefaultFreqs, Digs: digs, HasDisplayID: true}
	bundle, err := train.TrainBundle(context.Background(), log, features.NewSpec(log.Freqs, true), train.TrainOptions{Forest: train.Options{Seed: 7}})
	if err != nil {
		b.Fatal(err)
	}
	Prepare(bundle)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		b.Fatal(err)
	}
	if err := bundle.Save(path); err != nil {
		b.Fatal(err)
	}
	return path
}

// classifyLoad is how spade classify loads a model.
var classifyLoad = train.LoadOptions{NoOutOfBag: true, Whitened: true, Mapped: true}

// BenchmarkScaleLoad: a model's load as classify does it, and the
// classifier made from it (issue 15: at 100,000 digs no more than 3× the
// 2,000-dig figure).
func BenchmarkScaleLoad(b *testing.B) {
	for _, n := range []int{2000, 100000} {
		path := scaleModel(b, n)
		b.Run(fmt.Sprintf("digs=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for range b.N {
				bundle, err := train.LoadWith(path, classifyLoad)
				if err != nil {
					b.Fatal(err)
				}
				New(bundle, nil)
			}
		})
	}
}

// BenchmarkScaleClassify: one reading past the start-up (the neighbour
// index built), extraction, forest, neighbours, novelty and the ordnance
// screen included (issue 15: at 100,000 digs no more than 2× the 2,000-dig
// figure; at 5,000 digs 50 µs or less).
func BenchmarkScaleClassify(b *testing.B) {
	readings, _, err := datasets.Simulate(datasets.Options{N: 1000, Seed: 99, Unlabelled: true})
	if err != nil {
		b.Fatal(err)
	}
	for _, n := range []int{2000, 5000, 100000} {
		bundle, err := train.LoadWith(scaleModel(b, n), classifyLoad)
		if err != nil {
			b.Fatal(err)
		}
		c := New(bundle, nil)
		for i := range 2 * indexAfter {
			if _, err := c.Classify(&readings[i%len(readings)]); err != nil {
				b.Fatal(err)
			}
		}
		b.Run(fmt.Sprintf("digs=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for i := range b.N {
				if _, err := c.Classify(&readings[i%len(readings)]); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
