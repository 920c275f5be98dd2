package train

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
)

// TestWalkSideBySideEqualsTreeByTree: Predict walks 32 trees side by side
// (addAll); its probabilities must equal, to the bit, the tree-by-tree sum
// in tree order (addTree), on forests of pure leaves and of mixed ones
// (a minimum leaf size of 5), with tree counts that are and are not a
// multiple of the lanes, on the digs and on random and non-finite inputs.
func TestWalkSideBySideEqualsTreeByTree(t *testing.T) {
	ds, _ := demo(t)
	rng := rand.New(rand.NewPCG(3, 4))
	for _, o := range []Options{{Trees: 1, Seed: 1}, {Trees: 45, Seed: 2}, {Trees: 64, Seed: 3, MinLeaf: 5}, {Trees: 7, Seed: 4, MaxDepth: 3}} {
		f, _, err := Grow(context.Background(), ds, o)
		if err != nil {
			t.Fatal(err)
		}
		mixed := len(f.flat.leafCls) > 0
		if (o.MinLeaf > 1 || o.MaxDepth > 0) != mixed {
			t.Fatalf("%+v: mixed leaves %v", o, mixed)
		}
		x := make([]float64, len(ds.Names))
		for i := range ds.Rows() + 200 {
			if i < ds.Rows() {
				x = ds.Row(i, x)
			} else {
				for j := range x {
					x[j] = rng.NormFloat64() * 100
				}
				if i%50 == 0 {
					x[rng.IntN(len(x))] = math.NaN()
				}
			}
			got := f.Predict(x, nil)
			want := make([]float64, len(f.Classes))
			for tr := range f.NumTrees() {
				f.flat.addTree(tr, x, want)
			}
			for k := range want {
				want[k] *= 1 / float64(f.NumTrees())
				if math.Float64bits(got[k]) != math.Float64bits(want[k]) {
					t.Fatalf("%+v row %d class %d: side by side %v, tree by tree %v", o, i, k, got[k], want[k])
				}
			}
		}
	}
}

// TestTreeRebuiltFromFlat: the grown form rebuilt from the flat one
// reaches, for every dig, a leaf with the same class counts.
func TestTreeRebuiltFromFlat(t *testing.T) {
	ds, _ := demo(t)
	f, _, err := Grow(context.Background(), ds, Options{Trees: 5, Seed: 9, MinLeaf: 3})
	if err != nil {
		t.Fatal(err)
	}
	x := make([]float64, len(ds.Names))
	for tr := range f.NumTrees() {
		tree := f.Tree(tr)
		lo, _ := f.flat.span(tr)
		for i := range ds.Rows() {
			x = ds.Row(i, x)
			l := tree.Leaf(x)
			n := f.flat.nodes[lo]
			for n.kind() < leafKind {
				next := lo + n.rest()
				if x[n.kind()] > n.thr() {
					next++
				}
				n = f.flat.nodes[next]
			}
			cls, counts := f.flat.leafCounts(n)
			for j := range cls {
				if tree.LeafClass[tree.LeafStart[l]+int32(j)] != cls[j] || tree.LeafCount[tree.LeafStart[l]+int32(j)] != counts[j] {
					t.Fatalf("tree %d dig %d: rebuilt leaf differs", tr, i)
				}
			}
		}
	}
}
