package train

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
)

// The checks of a forest read from a file (formats 4 and 5), before any
// walk: a hostile or damaged file must end in an error, never a panic or a
// walk without end.

// checkRoots checks that the trees start in order, the first at node 0.
func (ff *flatForest) checkRoots(nodes int) error {
	if ff.roots[0] != 0 {
		return errors.New("the first tree does not start at the first node")
	}
	for t := 1; t < len(ff.roots); t++ {
		if ff.roots[t] <= ff.roots[t-1] || int(ff.roots[t]) >= nodes {
			return fmt.Errorf("tree %d starts at node %d, out of order", t, ff.roots[t])
		}
	}
	return nil
}

// check makes sure a forest read from a file is one compile could have
// made: in each tree every node but the root the child of exactly one split
// before it (so the tree is a tree, and a walk ends at a leaf), features and
// classes in range, every count positive, and the mixed leaves' shares
// taken in order, each once. The trees are checked on every core (checking
// each piece of nodes as it was read, on one, took longer), then the mixed
// leaves' shares computed.
func (ff *flatForest) check(features int) error {
	used := make([]treeUse, len(ff.roots))
	errs := make([]error, len(ff.roots))
	onEveryCore(len(ff.roots), func(t int, scratch *[]uint8) {
		u := &used[t]
		*scratch, u.first, u.count, errs[t] = ff.checkTree(t, features, *scratch)
	})
	if err := errors.Join(errs...); err != nil {
		return err
	}
	return ff.leafShares(used)
}

// onEveryCore runs do(0) to do(n−1) on every core, each worker with
// scratch space of its own.
func onEveryCore(n int, do func(i int, scratch *[]uint8)) {
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), n) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var scratch []uint8
			for i := next.Add(1) - 1; i < int64(n); i = next.Add(1) - 1 {
				do(int(i), &scratch)
			}
		}()
	}
	wg.Wait()
}

// treeUse is the range of mixed leaf shares a tree uses.
type treeUse struct{ first, count uint32 }

// checkOne is format 5's check of tree t: checkWalk, and checkTree when
// that cannot tell (a mixed leaf) or to name what is wrong.
func (ff *flatForest) checkOne(t, features int, scratch *[]uint8) (u treeUse, err error) {
	if ff.checkWalk(t, features) {
		return treeUse{}, nil // no mixed leaves
	}
	*scratch, u.first, u.count, err = ff.checkTree(t, features, *scratch)
	return u, err
}

// leafShares checks that the trees take the mixed leaves' shares in order,
// each once, and computes them.
func (ff *flatForest) leafShares(used []treeUse) error {
	next := uint32(0)
	for t, u := range used {
		if u.count > 0 && u.first != next {
			return fmt.Errorf("tree %d: mixed leaves out of order", t)
		}
		next += u.count
	}
	if int(next) != len(ff.leafCls) {
		return fmt.Errorf("%d leaf shares, the leaves use %d", len(ff.leafCls), next)
	}
	ff.leafProb = make([]float64, len(ff.leafCls))
	for t, u := range used {
		if u.count == 0 {
			continue
		}
		lo, hi := ff.span(t)
		for _, n := range ff.nodes[lo:hi] {
			if n.kc == mixedKC {
				copy(ff.leafProb[n.lo:], shares(ff.leafCount[n.lo:n.lo+n.hi]))
			}
		}
	}
	return nil
}

// checkWalk is whether tree t holds only what a walk can take: splits on
// a feature there is, whose children come after them and inside the tree,
// and pure leaves of a class there is and a positive count. A walk then
// ends at a leaf of the tree, within its arrays, whatever the nodes are.
// That every node but the root is one split's child, which checkTree also
// makes sure of, a walk does not need; Forest.Tree checks it where a tree
// is rebuilt. Each node's checks are differences whose sign says whether
// one failed, with no branch on the data: splits and leaves come in no
// order a processor can learn. Measured on the 100,000-dig model's 4.3
// million nodes, each tree's checksum and then this, on two cores, in one
// run: 7.7 ms, against 12 with a branch between split and leaf, 12 when
// also showing the nodes a tree (seen-store counting), and 15 with
// checkTree.
func (ff *flatForest) checkWalk(t, features int) bool {
	lo, hi := ff.span(t)
	size := int64(hi - lo)
	K, nf := int64(ff.K), int64(features)
	var bad int64
	nodes := ff.nodes[lo:hi]
	for i := range nodes {
		n := &nodes[i]
		kc := int64(n.kc)
		k, r := kc>>restBits, kc&restMask
		split := (k - leafKind) >> 63 // −1 for a split, 0 for a leaf
		// Each negative when its check fails: k < nf, i < r, r+1 < size;
		// the pure leaf's kind and rest, class < K, count ≥ 1.
		splitBad := (nf - 1 - k) | (r - int64(i) - 1) | (size - 2 - r)
		leafBad := -(kc ^ pureKC) | (K - 1 - int64(n.lo)) | (int64(n.hi) - 1)
		bad |= split&splitBad | ^split&leafBad
	}
	return bad >= 0
}

// checkTree checks tree t, child being scratch space, and gives the range of
// mixed leaf shares it uses. Splits and pure leaves are checked without a
// branch: they come in no order a predictor can learn, and with branches
// the loop took twice as long. Only a node that fails both checks (a mixed
// leaf, or an error) goes the slow way.
func (ff *flatForest) checkTree(t, features int, child []uint8) (_ []uint8, first, count uint32, err error) {
	lo, hi := ff.span(t)
	size := hi - lo
	if size > maxTreeNodes {
		return child, 0, 0, fmt.Errorf("tree %d has %d nodes, more than %d", t, size, maxTreeNodes)
	}
	// child[i] is 1 once node i is some split's child; the two entries
	// past the tree take the writes of leaves, which have no children.
	child = append(child[:0], make([]uint8, size+2)...)
	K, nf := uint32(ff.K), uint32(features)
	splits := int32(0)
	for i, n := range ff.nodes[lo:hi] {
		i := int32(i)
		k, r := n.kc>>restBits, int32(n.kc&restMask)
		split := b2u(k < leafKind)
		inTree := split & b2u(r > i) & b2u(r+1 < size)
		at := int32(inTree)*r + int32(1-inTree)*size
		okSplit := inTree & b2u(k < nf) & b2u(child[at]|child[at+1] == 0)
		child[at], child[at+1] = 1, 1
		okLeaf := b2u(n.kc == pureKC) & b2u(n.lo < K) & b2u(n.hi-1 < math.MaxInt32)
		splits += int32(split)
		if split&okSplit|(1-split)&okLeaf != 0 {
			continue
		}
		if split == 1 || n.kc != mixedKC {
			return child, 0, 0, fmt.Errorf("tree %d node %d: malformed (kind %#x, children %d, class %d, count %d)", t, i, n.kc, r, n.lo, n.hi)
		}
		if count == 0 {
			first = n.lo
		}
		if n.lo != first+count || n.hi < 2 || uint64(n.lo)+uint64(n.hi) > uint64(len(ff.leafCls)) {
			return child, 0, 0, fmt.Errorf("tree %d node %d: mixed leaf malformed", t, i)
		}
		prev := int32(-1)
		for j := n.lo; j < n.lo+n.hi; j++ {
			if ff.leafCls[j] <= prev || uint32(ff.leafCls[j]) >= K || ff.leafCount[j] <= 0 {
				return child, 0, 0, fmt.Errorf("tree %d node %d: leaf share %d malformed", t, i, j)
			}
			prev = ff.leafCls[j]
		}
		count += n.hi
	}
	// With no node a child twice, 2·splits+1 nodes make every node but the
	// root a child once.
	if 2*splits+1 != size {
		return child, 0, 0, fmt.Errorf("tree %d: %d splits and %d nodes is no tree", t, splits, size)
	}
	return child, first, count, nil
}

// b2u is 1 for true, 0 for false (compiled without a branch).
func b2u(b bool) uint32 {
	if b {
		return 1
	}
	return 0
}
