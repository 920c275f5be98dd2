package train

// flatForest is the forest as it is kept once grown or loaded: every tree's
// nodes in one array of 16-byte nodes (a node visited is one cache line
// touched, where three parallel arrays cost three). A fully grown tree's
// leaves are pure (at 100,000 digs, all 2.2 million of them were), so a
// pure leaf is a node of its own kind holding its class and its count, and
// only a mixed leaf (a minimum leaf size above one, or a depth limit) has
// (class, count, share) triples in the leaf arrays. The grown Trees are not
// kept: at 100,000 digs they doubled the memory of a loaded model, and
// everything they told (golearn's trees, the model file) is rebuilt from
// this form.
type flatForest struct {
	K     int
	roots []int32 // tree t is nodes[roots[t]:roots[t+1]], the last ending at len(nodes)
	nodes []flatNode
	// A mixed leaf's shares, in class order: class, bootstrap-weighted
	// count, and count over the leaf's total.
	leafCls   []int32
	leafCount []int32
	leafProb  []float64
}

// flatNode is a split, a pure leaf or a mixed leaf, by feature:
//
//	feature >= 0: a split; go to child, or child+1 when x[feature] > thr
//	feature == -1: a pure leaf of class child, thr its count (a whole number)
//	feature <= -2: a mixed leaf of -feature shares from child in the leaf arrays
type flatNode struct {
	thr     float64
	feature int32
	child   int32
}

// pureLeaf marks a pure leaf in flatNode.feature.
const pureLeaf = -1

// compile lays grown trees out flat, sized exactly up front.
func compile(trees []*Tree, K int) *flatForest {
	nodes, mixed := 0, 0
	for _, t := range trees {
		nodes += t.Nodes()
		for l := range len(t.LeafStart) - 1 {
			if n := int(t.LeafStart[l+1] - t.LeafStart[l]); n > 1 {
				mixed += n
			}
		}
	}
	ff := &flatForest{K: K, roots: make([]int32, 0, len(trees)), nodes: make([]flatNode, 0, nodes),
		leafCls: make([]int32, 0, mixed), leafCount: make([]int32, 0, mixed), leafProb: make([]float64, 0, mixed)}
	for _, t := range trees {
		base := int32(len(ff.nodes))
		ff.roots = append(ff.roots, base)
		for i := range t.Feature {
			if t.Feature[i] >= 0 {
				ff.nodes = append(ff.nodes, flatNode{thr: t.Threshold[i], feature: t.Feature[i], child: base + t.Left[i]})
				continue
			}
			l := t.Left[i]
			lo, hi := t.LeafStart[l], t.LeafStart[l+1]
			ff.nodes = append(ff.nodes, ff.leaf(t.LeafClass[lo:hi], t.LeafCount[lo:hi]))
		}
	}
	return ff
}

// leaf makes the node of a leaf with these (class, count) pairs, adding a
// mixed leaf's shares to the leaf arrays. A share is count over the leaf's
// total, summed in class order: a pure leaf's share is exactly 1.
func (ff *flatForest) leaf(cls, counts []int32) flatNode {
	if len(cls) == 1 {
		return flatNode{thr: float64(counts[0]), feature: pureLeaf, child: cls[0]}
	}
	var tot float64
	for _, c := range counts {
		tot += float64(c)
	}
	start := int32(len(ff.leafCls))
	for j, c := range counts {
		ff.leafCls = append(ff.leafCls, cls[j])
		ff.leafCount = append(ff.leafCount, c)
		ff.leafProb = append(ff.leafProb, float64(c)/tot)
	}
	return flatNode{feature: -int32(len(cls)), child: start}
}

// addTree adds tree t's leaf shares for x to p.
func (ff *flatForest) addTree(t int, x []float64, p []float64) {
	n := ff.nodes[ff.roots[t]]
	for n.feature >= 0 {
		next := n.child
		if x[n.feature] > n.thr {
			next++
		}
		n = ff.nodes[next]
	}
	ff.addLeaf(n, p)
}

// addLeaf adds a leaf's shares to p.
func (ff *flatForest) addLeaf(n flatNode, p []float64) {
	if n.feature == pureLeaf {
		p[n.child]++
		return
	}
	end := n.child - n.feature
	cls, prob := ff.leafCls[n.child:end], ff.leafProb[n.child:end]
	for j, k := range cls {
		p[k] += prob[j]
	}
}

// span is tree t's nodes.
func (ff *flatForest) span(t int) (lo, hi int32) {
	hi = int32(len(ff.nodes))
	if t+1 < len(ff.roots) {
		hi = ff.roots[t+1]
	}
	return ff.roots[t], hi
}

// leafCounts are a leaf node's (class, count) pairs.
func (ff *flatForest) leafCounts(n flatNode) (cls, counts []int32) {
	if n.feature == pureLeaf {
		return []int32{n.child}, []int32{int32(n.thr)}
	}
	end := n.child - n.feature
	return ff.leafCls[n.child:end], ff.leafCount[n.child:end]
}

// NumTrees is the number of trees.
func (f *Forest) NumTrees() int { return len(f.flat.roots) }

// Nodes is the number of nodes in all trees.
func (f *Forest) Nodes() int { return len(f.flat.nodes) }

// Tree is tree t rebuilt in the grown form (its leaves numbered in node
// order), for golearn's trees and for tests.
func (f *Forest) Tree(t int) *Tree {
	ff := f.flat
	lo, hi := ff.span(t)
	tr := &Tree{LeafStart: []int32{0}}
	for _, n := range ff.nodes[lo:hi] {
		if n.feature >= 0 {
			tr.Feature = append(tr.Feature, n.feature)
			tr.Threshold = append(tr.Threshold, n.thr)
			tr.Left = append(tr.Left, n.child-lo)
			continue
		}
		cls, counts := ff.leafCounts(n)
		tr.Feature = append(tr.Feature, -1)
		tr.Threshold = append(tr.Threshold, 0)
		tr.Left = append(tr.Left, int32(len(tr.LeafStart)-1))
		tr.LeafClass = append(tr.LeafClass, cls...)
		tr.LeafCount = append(tr.LeafCount, counts...)
		tr.LeafStart = append(tr.LeafStart, int32(len(tr.LeafClass)))
	}
	return tr
}

// lanes is how many trees addAll walks side by side. Each step of a
// walk waits on a node that, in a long history's forest, is rarely in the
// cache; walking trees side by side lets the processor wait for many
// nodes at once (memory-level parallelism) instead of one after another.
// Measured with BenchmarkPredict at 2,000 / 5,000 / 100,000 digs (one
// run): one tree at a time 20.5 / 28.7 / 148 µs; 8 lanes 18.5 / 22.0 /
// 51 µs; 16: 17.1 / 20.2 / 40.6; 32: 16.7 / 19.4 / 36.4; 64 and all 200
// no better, nor skipping the lanes already at a leaf.
const lanes = 32

// addAll adds every tree's leaf shares for x to p, in tree order, as
// adding tree by tree does: the same sums in the same order, to the bit.
func (ff *flatForest) addAll(x []float64, p []float64) {
	nodes := ff.nodes
	var at [lanes]flatNode
	for t0 := 0; t0 < len(ff.roots); t0 += lanes {
		m := min(lanes, len(ff.roots)-t0)
		for j := range m {
			at[j] = nodes[ff.roots[t0+j]]
		}
		for more := true; more; {
			more = false
			for j := range m {
				if n := at[j]; n.feature >= 0 {
					next := n.child
					if x[n.feature] > n.thr {
						next++
					}
					at[j] = nodes[next]
					more = true
				}
			}
		}
		for _, n := range at[:m] {
			ff.addLeaf(n, p)
		}
	}
}
