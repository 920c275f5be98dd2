package kdtree

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

func randomRows(n, dims int, seed uint64) []float64 {
	r := rand.New(rand.NewPCG(seed, 2))
	ref := make([]float64, n*dims)
	for i := range ref {
		ref[i] = r.NormFloat64() * float64(1+i%dims)
	}
	return ref
}

// TestNearestIsBruteForce: the k nearest by the tree are those of sorting
// every row by (squared distance, row), to the bit; the squared distances
// of the sort are summed as the scan sums them (dist2Within with no bound).
func TestNearestIsBruteForce(t *testing.T) {
	const dims = 7
	ref := randomRows(3000, dims, 1)
	x := Build(ref, dims)
	if err := x.Check(3000, dims); err != nil {
		t.Fatalf("Build's own tree refused: %v", err)
	}
	r := rand.New(rand.NewPCG(3, 4))
	for trial := range 200 {
		q := randomRows(1, dims, uint64(100+trial))
		skip := -1
		if trial%3 == 0 {
			skip = r.IntN(3000)
			q = ref[skip*dims : (skip+1)*dims]
		}
		var all []Hit
		for i := range 3000 {
			if i != skip {
				d, _ := dist2Within(ref[i*dims:(i+1)*dims], q, 1e308)
				all = append(all, Hit{Dist: d, Row: i})
			}
		}
		slices.SortFunc(all, func(a, b Hit) int {
			if a.Dist != b.Dist {
				if a.Dist < b.Dist {
					return -1
				}
				return 1
			}
			return a.Row - b.Row
		})
		got := x.Nearest(q, 6, skip, nil)
		for i, h := range got {
			if h.Row != all[i].Row || h.Dist != math.Sqrt(all[i].Dist) {
				t.Fatalf("trial %d #%d: row %d at %v, want %d at %v", trial, i, h.Row, h.Dist, all[i].Row, math.Sqrt(all[i].Dist))
			}
		}
		if len(got) != 6 {
			t.Fatalf("trial %d: %d rows", trial, len(got))
		}
	}
}

// TestCheckRefusesMalformed: a tree read from a damaged or hostile file is
// refused before any search can loop or leave its arrays.
func TestCheckRefusesMalformed(t *testing.T) {
	const n, dims = 500, 3
	good := Build(randomRows(n, dims, 5), dims)
	if err := good.Check(n, dims); err != nil {
		t.Fatal(err)
	}
	split := slices.IndexFunc(good.Nodes, func(nd Node) bool { return nd.Dim >= 0 && nd.Lo > 2 })
	leaf := slices.IndexFunc(good.Nodes, func(nd Node) bool { return nd.Dim < 0 && nd.Lo > 0 })
	cases := map[string]func(x *Tree){
		"child before its parent": func(x *Tree) { x.Nodes[split].Lo = int32(split) },
		"cycle to the root":       func(x *Tree) { x.Nodes[split].Hi = 0 },
		"child past the end":      func(x *Tree) { x.Nodes[split].Hi = int32(len(x.Nodes)) },
		"two parents":             func(x *Tree) { x.Nodes[0].Hi = x.Nodes[0].Lo },
		"dimension out of range":  func(x *Tree) { x.Nodes[split].Dim = dims },
		"leaf rows out of range":  func(x *Tree) { x.Nodes[leaf].Hi = n + 1 },
		"leaf rows out of order":  func(x *Tree) { x.Nodes[leaf].Lo-- },
		"row twice":               func(x *Tree) { x.Perm[1] = x.Perm[0] },
		"row out of range":        func(x *Tree) { x.Perm[7] = n },
		"points short":            func(x *Tree) { x.Points = x.Points[:len(x.Points)-1] },
		"negative kind":           func(x *Tree) { x.Nodes[leaf].Dim = -2 },
	}
	for name, mutate := range cases {
		bad := &Tree{Dims: dims, Points: slices.Clone(good.Points), Perm: slices.Clone(good.Perm), Nodes: slices.Clone(good.Nodes)}
		mutate(bad)
		if err := bad.Check(n, dims); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
	// A chain deeper than any balanced tree of these rows.
	deep := &Tree{Dims: 1, Points: make([]float64, 80), Perm: make([]int32, 80)}
	for i := range deep.Perm {
		deep.Perm[i] = int32(i)
	}
	for i := range 79 {
		deep.Nodes = append(deep.Nodes, Node{Dim: 0, Lo: int32(len(deep.Nodes) + 1), Hi: int32(len(deep.Nodes) + 2)}, Node{Dim: -1, Lo: int32(i), Hi: int32(i + 1)})
	}
	deep.Nodes = deep.Nodes[:len(deep.Nodes)-1]
	deep.Nodes[len(deep.Nodes)-1] = Node{Dim: -1, Lo: 78, Hi: 80}
	if err := deep.Check(80, 1); err == nil || !strings.Contains(err.Error(), "deeper") {
		t.Errorf("a chain 78 deep: %v", err)
	}
}
