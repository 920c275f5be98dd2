package train

import (
	"fmt"
	"math"
)

// flatForest is the forest as it is kept once grown or loaded: every tree's
// nodes in one array of 12-byte nodes (a node visited is one cache line
// touched, where three parallel arrays cost three). A fully grown tree's
// leaves are pure (at 100,000 digs, all 2.2 million of them were), so a
// pure leaf is a node of its own kind holding its class and its count, and
// only a mixed leaf (a minimum leaf size above one, or a depth limit) has
// (class, count, share) triples in the leaf arrays. The grown Trees are not
// kept: at 100,000 digs they doubled the memory of a loaded model, and
// everything they told (golearn's trees, older model files) is rebuilt
// from this form. Model format 4 stores this form as it is.
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

// flatNode is a split, a pure leaf or a mixed leaf, in 12 bytes (16 with a
// float64 field, for Go aligns it: at 100,000 digs the 4.3 million nodes
// took 69 MB, now 52). kc holds the kind in its top kindBits bits and a
// number in the rest:
//
//	kind < leafKind: a split on feature kind; lo, hi are the threshold's
//	    float64 bits (low, high word); go to the tree's node (the rest),
//	    or the one after it when x[kind] > threshold
//	kind == leafKind, rest 0: a pure leaf of class lo, hi its count
//	kind == leafKind, rest 1: a mixed leaf of hi shares from lo in the
//	    leaf arrays
//
// A node's child is counted from its tree's root, so a forest of any size
// fits; one tree holds at most maxTreeNodes nodes and a forest splits on
// at most maxFeatures features.
type flatNode struct {
	lo, hi, kc uint32
}

const (
	kindBits     = 9
	restBits     = 32 - kindBits
	restMask     = 1<<restBits - 1
	leafKind     = 1<<kindBits - 1
	maxFeatures  = leafKind      // 511 features: 127 frequencies of four
	maxTreeNodes = 1 << restBits // 8.4 million nodes: a bootstrap of some 6 million digs
	pureKC       = leafKind << restBits
	mixedKC      = pureKC | 1
)

// errTooLarge is a forest that does not fit the compiled form.
var errTooLarge = fmt.Errorf("train: a forest splits on at most %d features and a tree holds at most %d nodes; train with fewer frequencies or a smaller bootstrap", maxFeatures, maxTreeNodes)

func splitNode(feature int32, thr float64, child int32) flatNode {
	b := math.Float64bits(thr)
	return flatNode{lo: uint32(b), hi: uint32(b >> 32), kc: uint32(feature)<<restBits | uint32(child)}
}

func (n flatNode) kind() uint32 { return n.kc >> restBits }
func (n flatNode) rest() int32  { return int32(n.kc & restMask) }
func (n flatNode) thr() float64 { return math.Float64frombits(uint64(n.hi)<<32 | uint64(n.lo)) }

// compile lays grown trees out flat, sized exactly up front, in the grown
// trees' own order: a split's two children side by side, a subtree's nodes
// near one another (grown depth first). Laid out breadth first instead
// (which would make a loaded tree checkable with a counter), prediction at
// 100,000 digs took 50 µs instead of 38-40 in one run: the deep levels of a
// walk then fall in lines of their own.
func compile(trees []*Tree, K int) (*flatForest, error) {
	nodes, mixed := 0, 0
	for _, t := range trees {
		if t.Nodes() > maxTreeNodes {
			return nil, errTooLarge
		}
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
		ff.roots = append(ff.roots, int32(len(ff.nodes)))
		for i := range t.Feature {
			if f := t.Feature[i]; f >= 0 {
				if f >= maxFeatures {
					return nil, errTooLarge
				}
				ff.nodes = append(ff.nodes, splitNode(f, t.Threshold[i], t.Left[i]))
				continue
			}
			l := t.Left[i]
			lo, hi := t.LeafStart[l], t.LeafStart[l+1]
			ff.nodes = append(ff.nodes, ff.leaf(t.LeafClass[lo:hi], t.LeafCount[lo:hi]))
		}
	}
	return ff, nil
}

// leaf makes the node of a leaf with these (class, count) pairs, adding a
// mixed leaf's shares to the leaf arrays.
func (ff *flatForest) leaf(cls, counts []int32) flatNode {
	if len(cls) == 1 {
		return flatNode{lo: uint32(cls[0]), hi: uint32(counts[0]), kc: pureKC}
	}
	start := uint32(len(ff.leafCls))
	ff.leafCls = append(ff.leafCls, cls...)
	ff.leafCount = append(ff.leafCount, counts...)
	ff.leafProb = append(ff.leafProb, shares(counts)...)
	return flatNode{lo: start, hi: uint32(len(cls)), kc: mixedKC}
}

// shares are counts over their total, summed in class order: a pure
// leaf's share is exactly 1.
func shares(counts []int32) []float64 {
	var tot float64
	for _, c := range counts {
		tot += float64(c)
	}
	p := make([]float64, len(counts))
	for j, c := range counts {
		p[j] = float64(c) / tot
	}
	return p
}

// addTree adds tree t's leaf shares for x to p.
func (ff *flatForest) addTree(t int, x []float64, p []float64) {
	root := ff.roots[t]
	n := ff.nodes[root]
	// A checked tree's walk ends within its nodes; the count stops one
	// over nodes changed since (a mapped file rewritten under it).
	for k, steps := n.kind(), 0; k < leafKind && steps < maxTreeNodes; k, steps = n.kind(), steps+1 {
		next := root + n.rest()
		if x[k] > n.thr() {
			next++
		}
		n = ff.nodes[next]
	}
	ff.addLeaf(n, p)
}

// addLeaf adds a leaf's shares to p.
func (ff *flatForest) addLeaf(n flatNode, p []float64) {
	if n.kc == pureKC {
		p[n.lo]++
		return
	}
	cls, prob := ff.leafCls[n.lo:n.lo+n.hi], ff.leafProb[n.lo:n.lo+n.hi]
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
	if n.kc == pureKC {
		return []int32{int32(n.lo)}, []int32{int32(n.hi)}
	}
	return ff.leafCls[n.lo : n.lo+n.hi], ff.leafCount[n.lo : n.lo+n.hi]
}

// NumTrees is the number of trees.
func (f *Forest) NumTrees() int { return len(f.flat.roots) }

// Nodes is the number of nodes in all trees.
func (f *Forest) Nodes() int { return len(f.flat.nodes) }

// Tree is tree t rebuilt in the grown form (its leaves numbered in node
// order), for golearn's trees and for tests; nil when its nodes are not a
// tree (some node two splits' child), which a format 5 load leaves to be
// checked here, as a walk does not need it (checkWalk).
func (f *Forest) Tree(t int) *Tree {
	ff := f.flat
	features := len(f.Names)
	if features == 0 {
		features = maxFeatures // not yet named: any feature a node can hold
	}
	if _, _, _, err := ff.checkTree(t, features, nil); err != nil {
		return nil
	}
	lo, hi := ff.span(t)
	tr := &Tree{LeafStart: []int32{0}}
	for _, n := range ff.nodes[lo:hi] {
		if k := n.kind(); k < leafKind {
			tr.Feature = append(tr.Feature, int32(k))
			tr.Threshold = append(tr.Threshold, n.thr())
			tr.Left = append(tr.Left, n.rest())
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
	var root [lanes]int32
	for t0 := 0; t0 < len(ff.roots); t0 += lanes {
		m := min(lanes, len(ff.roots)-t0)
		for j := range m {
			root[j] = ff.roots[t0+j]
			at[j] = nodes[root[j]]
		}
		// A checked tree's walk ends within its nodes; the count stops
		// one over nodes changed since (a mapped file rewritten under it).
		for more, steps := true, 0; more && steps < maxTreeNodes; steps++ {
			more = false
			for j := range m {
				if n := at[j]; n.kind() < leafKind {
					next := root[j] + n.rest()
					if x[n.kind()] > n.thr() {
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
