package train

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
	"sync/atomic"
)

// Options for growing a forest.
type Options struct {
	Trees    int    // default 200
	Seed     uint64 // the same seed gives the same forest, whatever GOMAXPROCS
	Mtry     int    // features per split; default floor(sqrt(features))
	MinLeaf  int    // default 1
	MaxDepth int    // 0: unlimited
	// MaxSamples is each tree's bootstrap size: 0 (or more than the rows)
	// draws as many as there are rows. A smaller one grows smaller trees,
	// faster, for a very long history (scikit-learn's max_samples).
	MaxSamples int
	Workers    int // default GOMAXPROCS
	// Progress, when set, is called after each tree with the count done;
	// it may be called from several goroutines.
	Progress func(done int)
}

func (o Options) withDefaults(features int) Options {
	if o.Trees <= 0 {
		o.Trees = 200
	}
	if o.Mtry <= 0 {
		o.Mtry = max(1, int(math.Sqrt(float64(features))))
	}
	o.Mtry = min(o.Mtry, features)
	if o.MinLeaf <= 0 {
		o.MinLeaf = 1
	}
	if o.Workers <= 0 {
		o.Workers = runtime.GOMAXPROCS(0)
	}
	return o
}

// Forest is a grown random forest.
type Forest struct {
	Names      []string
	Classes    []string
	Mtry       int
	Importance []float64 // mean impurity decrease per feature, normalised to sum 1
	flat       *flatForest
}

// ErrNoData is returned for an empty table.
var ErrNoData = errors.New("train: no rows to train on")

// treeRNG is tree t's own generator: PCG seeded by the forest's seed and the
// tree's index, so trees can be grown in any order on any number of cores.
func treeRNG(seed uint64, t int) *rand.Rand {
	return rand.New(rand.NewPCG(seed, 0x7eee_0000+uint64(t)))
}

// bootstrap draws m of n rows with replacement as multiplicities.
func bootstrap(rng *rand.Rand, n, m int, w []int32) {
	clear(w)
	for range m {
		w[rng.IntN(n)]++
	}
}

// Samples is the bootstrap size for n rows.
func (o Options) Samples(n int) int {
	if o.MaxSamples > 0 && o.MaxSamples < n {
		return o.MaxSamples
	}
	return n
}

// Grow trains a forest on ds. It also returns the out-of-bag class
// probabilities of every row (NaN for a row that every tree saw).
func Grow(ctx context.Context, ds *Dataset, o Options) (*Forest, [][]float64, error) {
	n := ds.Rows()
	if n == 0 {
		return nil, nil, ErrNoData
	}
	o = o.withDefaults(len(ds.Names))
	K := len(ds.Classes)
	f := &Forest{Names: ds.Names, Classes: ds.Classes, Mtry: o.Mtry}
	grown := make([]*Tree, o.Trees)
	imps := make([][]float64, o.Trees)
	var next, done atomic.Int64
	var wg sync.WaitGroup
	for range min(o.Workers, o.Trees) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			w := make([]int32, n)
			for {
				t := int(next.Add(1) - 1)
				if t >= o.Trees || ctx.Err() != nil {
					return
				}
				rng := treeRNG(o.Seed, t)
				bootstrap(rng, n, o.Samples(n), w)
				imps[t] = make([]float64, len(ds.Names))
				p := treeParams{mtry: o.Mtry, minLeaf: o.MinLeaf, maxDepth: o.MaxDepth, classes: K, importances: imps[t]}
				grown[t] = growTree(ds, w, p, rng)
				if o.Progress != nil {
					o.Progress(int(done.Add(1)))
				}
			}
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, nil, err
	}
	// Importances summed in tree order, so the result does not depend on
	// which worker finished first.
	f.Importance = make([]float64, len(ds.Names))
	for _, imp := range imps {
		for j, v := range imp {
			f.Importance[j] += v
		}
	}
	var tot float64
	for _, v := range f.Importance {
		tot += v
	}
	for j := range f.Importance {
		if tot > 0 {
			f.Importance[j] /= tot
		}
	}
	flat, err := compile(grown, K)
	if err != nil {
		return nil, nil, err
	}
	f.flat = flat
	return f, f.outOfBag(ds, o), nil
}

// outOfBag redraws each tree's bootstrap (the generators are cheap to
// replay) and averages, per row, the trees that left it out.
func (f *Forest) outOfBag(ds *Dataset, o Options) [][]float64 {
	n, K := ds.Rows(), len(f.Classes)
	sums := make([]float64, n*K)
	votes := make([]int, n)
	w := make([]int32, n)
	x := make([]float64, len(ds.Names))
	for t := range f.NumTrees() {
		bootstrap(treeRNG(o.Seed, t), n, o.Samples(n), w)
		for i := range n {
			if w[i] > 0 {
				continue
			}
			x = ds.Row(i, x)
			f.flat.addTree(t, x, sums[i*K:(i+1)*K])
			votes[i]++
		}
	}
	out := make([][]float64, n)
	for i := range n {
		p := sums[i*K : (i+1)*K]
		for k := range p {
			if votes[i] == 0 {
				p[k] = math.NaN()
			} else {
				p[k] /= float64(votes[i])
			}
		}
		out[i] = p
	}
	return out
}

// Predict writes the class probabilities of x into p (grown if short): the
// mean of the leaf class shares over all trees.
func (f *Forest) Predict(x []float64, p []float64) []float64 {
	if len(x) != len(f.Names) {
		panic("train: length mismatch")
	}
	K := len(f.Classes)
	if cap(p) < K {
		p = make([]float64, K)
	}
	p = p[:K]
	clear(p)
	f.flat.addAll(x, p)
	inv := 1 / float64(len(f.flat.roots))
	for k := range p {
		p[k] *= inv
	}
	return p
}

// PredictDataset predicts every row of ds, in parallel, deterministically.
func (f *Forest) PredictDataset(ds *Dataset) [][]float64 {
	n := ds.Rows()
	out := make([][]float64, n)
	workers := runtime.GOMAXPROCS(0)
	var wg sync.WaitGroup
	chunk := (n + workers - 1) / workers
	for s := 0; s < n; s += chunk {
		wg.Add(1)
		go func(lo, hi int) {
			defer wg.Done()
			x := make([]float64, len(ds.Names))
			for i := lo; i < hi; i++ {
				x = ds.Row(i, x)
				out[i] = f.Predict(x, nil)
			}
		}(s, min(s+chunk, n))
	}
	wg.Wait()
	return out
}
