package classify

import (
	"context"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// learningRun grows a history from the demo pool 20 digs at a time, from
// 40 chosen at random, picking the next ones either at random or as the
// readings classify marks "worth digging to learn" (least confident
// first), and returns the held-out accuracy after each round.
func learningRun(t *testing.T, pool, test *train.Dataset, byUncertainty bool, rounds int, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 7))
	order := rng.Perm(pool.Rows())
	labelled := slices.Clone(order[:40])
	left := slices.Clone(order[40:])
	var acc []float64
	for r := 0; r <= rounds; r++ {
		ds := pool.Subset(labelled)
		f, oob, err := train.Grow(context.Background(), ds, train.Options{Trees: 60, Seed: seed})
		if err != nil {
			t.Fatal(err)
		}
		shrink := train.FitShrinkage(ds.Y, oob, len(ds.Classes))
		right := 0
		x := make([]float64, len(test.Names))
		for i := range test.Rows() {
			p := shrink.Apply(f.Predict(test.Row(i, x), nil))
			if int32(train.Argmax(p)) == test.Y[i] {
				right++
			}
		}
		acc = append(acc, float64(right)/float64(test.Rows()))
		if byUncertainty {
			score := make(map[int]float64, len(left))
			for _, i := range left {
				p := f.Predict(pool.Row(i, x), nil)
				score[i] = 1 - p[train.Argmax(p)] // Learn.Score
			}
			slices.SortStableFunc(left, func(a, b int) int {
				switch {
				case score[a] > score[b]:
					return -1
				case score[a] < score[b]:
					return 1
				}
				return 0
			})
		}
		labelled = append(labelled, left[:20]...)
		left = left[20:]
	}
	return acc
}

// TestDiggingToLearnNeedsFewerDigs: on the demo pool, choosing the next
// digs as the ones the model is least sure of reaches a given held-out
// accuracy with fewer digs than choosing at random. One run is noisy (the
// first 40 digs and the forest's seed swing it by a round or two), so the
// curves are the mean of four starts. Run with -v for the README's figures.
func TestDiggingToLearnNeedsFewerDigs(t *testing.T) {
	if testing.Short() {
		t.Skip("grows 160 forests")
	}
	_, log := demoModel(t)
	spec := features.NewSpec(log.Freqs, log.HasDisplayID)
	pool, err := train.FromLog(log, spec, features.LabelBoth)
	if err != nil {
		t.Fatal(err)
	}
	digs, _, err := datasets.Simulate(datasets.Options{N: 1000, Seed: 41})
	if err != nil {
		t.Fatal(err)
	}
	tlog := &features.Log{Freqs: log.Freqs, Digs: digs, HasDisplayID: true}
	test, err := train.FromLog(tlog, spec, features.LabelBoth)
	if err != nil {
		t.Fatal(err)
	}
	// The test set's class indices must be the pool's.
	for i, y := range test.Y {
		test.Y[i] = int32(slices.Index(pool.Classes, test.Classes[y]))
	}
	const rounds, starts = 18, 4
	random, smart := make([]float64, rounds+1), make([]float64, rounds+1)
	for seed := uint64(1); seed <= starts; seed++ {
		r := learningRun(t, pool, test, false, rounds, seed)
		s := learningRun(t, pool, test, true, rounds, seed)
		for k := range r {
			random[k] += r[k] / starts
			smart[k] += s[k] / starts
		}
	}
	reach := func(acc []float64, target float64) int {
		for r, a := range acc {
			if a >= target {
				return 40 + 20*r
			}
		}
		return -1
	}
	var areaR, areaS float64
	for r := range random {
		t.Logf("%4d digs: random %.3f, least confident first %.3f", 40+20*r, random[r], smart[r])
		areaR += random[r] / float64(len(random))
		areaS += smart[r] / float64(len(smart))
	}
	target := 0.75
	nr, ns := reach(random, target), reach(smart, target)
	t.Logf("digs to reach %.2f held-out accuracy (mean of %d starts): random %d, least confident first %d; mean accuracy over the curve %.3f against %.3f", target, starts, nr, ns, areaR, areaS)
	if ns < 0 || (nr >= 0 && ns >= nr) || areaS <= areaR {
		t.Errorf("least confident first reaches %.2f at %d digs, random at %d; mean accuracy %.3f against random's %.3f", target, ns, nr, areaS, areaR)
	}
}
