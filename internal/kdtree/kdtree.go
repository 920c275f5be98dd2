// Package kdtree is an exact k-d tree over rows of float64s (Bentley,
// "Multidimensional binary search trees used for associative searching",
// CACM 18(9), 1975): the k nearest rows of a query by Euclidean distance,
// the same rows and the same distances, to the bit, as a linear scan that
// sums the squares four terms at a time and orders by (distance, row).
//
// spade's classify searches the training digs' whitened vectors with it;
// a model (format 5) stores the tree as Build made it, so that a loaded
// model searches from its first reading without building one.
package kdtree

import (
	"errors"
	"fmt"
	"math"
)

// LeafSize is the most rows a leaf holds.
const LeafSize = 16

// MinRows is the number of rows from which the tree is worth its keep:
// below it, a linear scan is as fast or faster. Measured with classify's
// BenchmarkNearest (one run, a 2-core machine): 300 rows 3.1 µs by the
// tree against 4.4 by the scan, 100,000 rows 50 against 480; below this a
// scan takes a few microseconds.
const MinRows = 256

// Tree is the index. Points holds the rows in tree order, for the cache;
// Perm maps them back to the rows as they were given.
type Tree struct {
	Dims   int
	Points []float64
	Perm   []int32
	Nodes  []Node
}

// Node is a split or a leaf, in 24 bytes (the last four unused, zero).
type Node struct {
	Split float64
	Dim   int32 // -1 for a leaf
	// Lo, Hi are a leaf's rows in tree order; for a split, Lo is the left
	// child's node and Hi the right child's.
	Lo, Hi int32
	_      int32
}

// Hit is a row found near the query.
type Hit struct {
	Dist float64 // Euclidean
	Row  int     // as the rows were given to Build
}

// Build makes the tree of ref's rows (row-major, dims columns): split on
// the dimension of widest spread at the median, by quickselect. The same
// rows give the same tree.
func Build(ref []float64, dims int) *Tree {
	n := len(ref) / dims
	x := &Tree{Dims: dims, Perm: make([]int32, n)}
	for i := range x.Perm {
		x.Perm[i] = int32(i)
	}
	x.build(ref, 0, n)
	x.Points = make([]float64, 0, len(ref))
	for _, i := range x.Perm {
		x.Points = append(x.Points, ref[int(i)*dims:(int(i)+1)*dims]...)
	}
	return x
}

// build makes the node of rows Perm[lo:hi] and returns its number.
func (x *Tree) build(ref []float64, lo, hi int) int32 {
	id := int32(len(x.Nodes))
	x.Nodes = append(x.Nodes, Node{Dim: -1, Lo: int32(lo), Hi: int32(hi)})
	if hi-lo <= LeafSize {
		return id
	}
	// The spread is judged on at most 64 evenly spaced rows: the choice
	// only steers the search's speed, never its result.
	step := max(1, (hi-lo)/64)
	best, width := 0, -1.0
	for d := range x.Dims {
		mn, mx := math.Inf(1), math.Inf(-1)
		for t := lo; t < hi; t += step {
			r := x.Perm[t]
			v := ref[int(r)*x.Dims+d]
			mn, mx = math.Min(mn, v), math.Max(mx, v)
		}
		if mx-mn > width {
			best, width = d, mx-mn
		}
	}
	if width <= 0 && step == 1 {
		return id // all rows equal: one leaf
	}
	mid := (lo + hi) / 2
	x.selectNth(ref, best, lo, hi, mid)
	split := ref[int(x.Perm[mid])*x.Dims+best]
	left := x.build(ref, lo, mid)
	right := x.build(ref, mid, hi)
	x.Nodes[id] = Node{Split: split, Dim: int32(best), Lo: left, Hi: right}
	return id
}

// selectNth reorders Perm[lo:hi] so that Perm[nth] holds the row whose
// coordinate d would be there in sorted order, none before it larger and
// none after it smaller (Hoare's FIND, CACM 4(7), 1961).
func (x *Tree) selectNth(ref []float64, d, lo, hi, nth int) {
	key := func(i int) float64 { return ref[int(x.Perm[i])*x.Dims+d] }
	hi--
	for lo < hi {
		pivot := key((lo + hi) / 2)
		i, j := lo, hi
		for i <= j {
			for key(i) < pivot {
				i++
			}
			for key(j) > pivot {
				j--
			}
			if i <= j {
				x.Perm[i], x.Perm[j] = x.Perm[j], x.Perm[i]
				i++
				j--
			}
		}
		switch {
		case nth <= j:
			hi = j
		case nth >= i:
			lo = i
		default:
			return
		}
	}
}

// maxDepth bounds a tree read from a file: Build's trees are balanced, 31
// levels at 2³¹ rows.
const maxDepth = 64

// Check makes sure a tree read from a file is one Build could have made
// of n rows of dims columns, so that a search can neither leave the arrays
// nor go on without end: every node but the first the child of exactly
// one split before it, at most maxDepth deep, splits on a dimension there
// is, leaves' rows in range, and Perm a permutation of the rows.
func (x *Tree) Check(n, dims int) error {
	switch {
	case x.Dims != dims || dims <= 0:
		return fmt.Errorf("index of %d columns, the vectors have %d", x.Dims, dims)
	case len(x.Points) != n*dims || len(x.Perm) != n:
		return fmt.Errorf("index of %d points and %d rows, the model has %d digs", len(x.Points)/max(1, dims), len(x.Perm), n)
	case len(x.Nodes) == 0 || len(x.Nodes) > 2*n+1:
		return fmt.Errorf("index of %d nodes for %d rows", len(x.Nodes), n)
	}
	seen := make([]bool, n)
	for _, p := range x.Perm {
		if p < 0 || int(p) >= n || seen[p] {
			return errors.New("index rows are not each dig once")
		}
		seen[p] = true
	}
	depth := make([]uint8, len(x.Nodes))
	parented := make([]bool, len(x.Nodes))
	covered := 0
	for i, nd := range x.Nodes {
		if i > 0 && !parented[i] {
			return fmt.Errorf("index node %d has no parent before it", i)
		}
		if nd.Dim < 0 {
			if nd.Dim != -1 || nd.Lo != int32(covered) || nd.Hi <= nd.Lo && n > 0 || int(nd.Hi) > n {
				return fmt.Errorf("index leaf %d malformed (rows %d to %d)", i, nd.Lo, nd.Hi)
			}
			covered = int(nd.Hi)
			continue
		}
		if int(nd.Dim) >= dims || nd.Lo <= int32(i) || nd.Hi <= int32(i) || int(nd.Lo) >= len(x.Nodes) || int(nd.Hi) >= len(x.Nodes) || nd.Lo == nd.Hi {
			return fmt.Errorf("index node %d malformed (dimension %d, children %d and %d)", i, nd.Dim, nd.Lo, nd.Hi)
		}
		if depth[i] >= maxDepth {
			return fmt.Errorf("index deeper than %d", maxDepth)
		}
		for _, c := range [2]int32{nd.Lo, nd.Hi} {
			if parented[c] {
				return fmt.Errorf("index node %d has two parents", c)
			}
			parented[c] = true
			depth[c] = depth[i] + 1
		}
	}
	if covered != n {
		return fmt.Errorf("index leaves hold %d of %d rows", covered, n)
	}
	return nil
}

// boundSlack widens the pruning bound by a relative 1e-9, far above the
// rounding of a dozen sums of squares (about 1e-15 relative), so that a
// subtree whose bound, computed in floating point, passes the k-th best
// holds no row whose computed distance could equal or undercut it.
const boundSlack = 1 + 1e-9

// Nearest appends to out[:0] the k rows nearest to q, leaving out row skip
// (-1 for none), ordered by (distance, row). The search goes to the nearer
// child first, and to the farther only when the squared distance from q to
// its cell can still beat the k-th best: that distance is kept as the sum
// of q's offsets outside the cell along the splits on the way down, one
// offset a dimension, updated as each split is crossed (the incremental
// distance of Arya & Mount, "Algorithms for fast vector quantization",
// DCC 1993, cited from memory). It bounds every row in the cell from
// below, so the rows and distances are the scan's.
func (x *Tree) Nearest(q []float64, k, skip int, out []Hit) []Hit {
	out = out[:0]
	if k > 0 && len(x.Nodes) > 0 {
		var buf [32]float64
		var off []float64
		if x.Dims > len(buf) {
			off = make([]float64, x.Dims)
		} else {
			off = buf[:x.Dims]
		}
		out = x.search(0, q, k, skip, out, off, 0, 0)
	}
	for i := range out {
		out[i].Dist = math.Sqrt(out[i].Dist)
	}
	return out
}

// search visits node, depth splits down, whose cell is at squared distance
// rd from q, with off[d] q's offset outside the cell along dimension d.
// It goes no deeper than a checked tree can be, should the nodes have
// changed since they were checked (a mapped file rewritten under it).
func (x *Tree) search(node int32, q []float64, k, skip int, out []Hit, off []float64, rd float64, depth int) []Hit {
	if depth > maxDepth {
		return out
	}
	nd := x.Nodes[node]
	if nd.Dim < 0 {
		worst := math.Inf(1)
		if len(out) == k {
			worst = out[k-1].Dist
		}
		for t := nd.Lo; t < nd.Hi; t++ {
			row := int(x.Perm[t])
			if row == skip {
				continue
			}
			d, full := dist2Within(x.Points[int(t)*x.Dims:(int(t)+1)*x.Dims], q, worst)
			if !full {
				continue // already farther than the k-th best
			}
			out = insert(out, k, d, row)
			if len(out) == k {
				worst = out[k-1].Dist
			}
		}
		return out
	}
	e := q[nd.Dim] - nd.Split
	near, far := nd.Lo, nd.Hi
	if e > 0 {
		near, far = far, near
	}
	out = x.search(near, q, k, skip, out, off, rd, depth+1)
	old := off[nd.Dim]
	rdFar := rd - old*old + e*e
	if len(out) < k || rdFar <= out[k-1].Dist*boundSlack {
		off[nd.Dim] = e
		out = x.search(far, q, k, skip, out, off, rdFar, depth+1)
		off[nd.Dim] = old
	}
	return out
}

// insert puts row at squared distance d into out, kept sorted by
// (distance, row) and at most k long.
func insert(out []Hit, k int, d float64, row int) []Hit {
	less := func(a Hit) bool { return d < a.Dist || (d == a.Dist && row < a.Row) }
	if len(out) == k && !less(out[k-1]) {
		return out
	}
	pos := len(out)
	for pos > 0 && less(out[pos-1]) {
		pos--
	}
	if len(out) < k {
		out = append(out, Hit{})
	}
	copy(out[pos+1:], out[pos:len(out)-1])
	out[pos] = Hit{Dist: d, Row: row}
	return out
}

// dist2Within is the squared distance between a row and q, summed four
// terms at a time exactly as the scan sums them, so that both give the
// same bits; abandoned once it passes worst (full false), as a row farther
// than the k-th best needs no more.
func dist2Within(row, q []float64, worst float64) (d float64, full bool) {
	j := 0
	for ; j+4 <= len(row); j += 4 {
		e0, e1, e2, e3 := row[j]-q[j], row[j+1]-q[j+1], row[j+2]-q[j+2], row[j+3]-q[j+3]
		d += e0*e0 + e1*e1 + e2*e2 + e3*e3
		if d > worst {
			return d, false
		}
	}
	for ; j < len(row); j++ {
		e := row[j] - q[j]
		d += e * e
	}
	return d, d <= worst
}
