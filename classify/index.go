package classify

import (
	"math"
)

// indexMinRows is the history length from which nearest uses the k-d
// index instead of the scan. Measured with BenchmarkNearest (one run, this
// 2-core machine, since the incremental bound): the index wins at every
// size tried, 300 digs (3.1 against 4.4 µs) to 100,000 (50 against 480
// µs); below this a scan takes a few microseconds and is kept.
const indexMinRows = 256

// indexAfter is how many searches go by the scan before the index is
// built: building it costs about a hundred searches' saving at every size
// measured (128 µs at 300 digs, 0.9 ms at 2,000, 74 ms at 100,000), so a
// short run never pays for it.
const indexAfter = 100

// kdLeaf is the most rows a leaf of the index holds.
const kdLeaf = 16

// kdIndex is an exact k-d tree (Bentley, "Multidimensional binary search
// trees used for associative searching", CACM 18(9), 1975) over the
// whitened training rows. Its rows are a copy in tree order, for the cache;
// perm maps them back to training rows. Results equal the scan's to the
// bit, ties included (TestIndexEqualsScan): distances are summed as the
// scan sums them, candidates are ordered by (distance, row), and a subtree
// is skipped only when its plane alone is farther than the k-th best, a
// bound that floating-point sums of squares cannot undercut.
type kdIndex struct {
	dims  int
	pts   []float64
	perm  []int32
	nodes []kdNode
}

type kdNode struct {
	split float64
	dim   int32 // -1 for a leaf
	// lo, hi are the leaf's rows in tree order; for a split, lo is the
	// left child's node and hi the right child's.
	lo, hi int32
}

func newIndex(s *space) *kdIndex {
	n := len(s.ref) / s.dims
	x := &kdIndex{dims: s.dims, perm: make([]int32, n)}
	for i := range x.perm {
		x.perm[i] = int32(i)
	}
	x.build(s.ref, 0, n)
	x.pts = make([]float64, 0, len(s.ref))
	for _, i := range x.perm {
		x.pts = append(x.pts, s.ref[int(i)*s.dims:(int(i)+1)*s.dims]...)
	}
	return x
}

// build makes the node of rows perm[lo:hi] and returns its number: split
// on the dimension of widest spread at the median, by quickselect.
func (x *kdIndex) build(ref []float64, lo, hi int) int32 {
	id := int32(len(x.nodes))
	x.nodes = append(x.nodes, kdNode{dim: -1, lo: int32(lo), hi: int32(hi)})
	if hi-lo <= kdLeaf {
		return id
	}
	// The spread is judged on at most 64 evenly spaced rows: the choice
	// only steers the search's speed, never its result.
	step := max(1, (hi-lo)/64)
	best, width := 0, -1.0
	for d := range x.dims {
		mn, mx := math.Inf(1), math.Inf(-1)
		for t := lo; t < hi; t += step {
			r := x.perm[t]
			v := ref[int(r)*x.dims+d]
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
	split := ref[int(x.perm[mid])*x.dims+best]
	left := x.build(ref, lo, mid)
	right := x.build(ref, mid, hi)
	x.nodes[id] = kdNode{split: split, dim: int32(best), lo: left, hi: right}
	return id
}

// selectNth reorders perm[lo:hi] so that perm[nth] holds the row whose
// coordinate d would be there in sorted order, none before it larger and
// none after it smaller (Hoare's FIND, CACM 4(7), 1961).
func (x *kdIndex) selectNth(ref []float64, d, lo, hi, nth int) {
	key := func(i int) float64 { return ref[int(x.perm[i])*x.dims+d] }
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
				x.perm[i], x.perm[j] = x.perm[j], x.perm[i]
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

// boundSlack widens the pruning bound by a relative 1e-9, far above the
// rounding of a dozen sums of squares (about 1e-15 relative), so that a
// subtree whose bound, computed in floating point, passes the k-th best
// holds no row whose computed distance could equal or undercut it.
const boundSlack = 1 + 1e-9

// nearest is space.nearest by the index. The search goes to the nearer
// child first, and to the farther only when the squared distance from q to
// its cell can still beat the k-th best: that distance is kept as the sum
// of q's offsets outside the cell along the splits on the way down, one
// offset a dimension, updated as each split is crossed (the incremental
// distance of Arya & Mount, "Algorithms for fast vector quantization",
// DCC 1993, cited from memory). It bounds every row in the cell from
// below, so the rows and distances are the scan's.
func (x *kdIndex) nearest(q []float64, k, skip int, out []Neighbour) []Neighbour {
	out = out[:0]
	if k > 0 {
		var buf [32]float64
		var off []float64
		if x.dims > len(buf) {
			off = make([]float64, x.dims)
		} else {
			off = buf[:x.dims]
		}
		out = x.search(0, q, k, skip, out, off, 0)
	}
	for i := range out {
		out[i].Distance = math.Sqrt(out[i].Distance)
	}
	return out
}

// search visits node, whose cell is at squared distance rd from q, with
// off[d] q's offset outside the cell along dimension d.
func (x *kdIndex) search(node int32, q []float64, k, skip int, out []Neighbour, off []float64, rd float64) []Neighbour {
	nd := x.nodes[node]
	if nd.dim < 0 {
		worst := math.Inf(1)
		if len(out) == k {
			worst = out[k-1].Distance
		}
		for t := nd.lo; t < nd.hi; t++ {
			row := int(x.perm[t])
			if row == skip {
				continue
			}
			d, full := dist2Within(x.pts[int(t)*x.dims:(int(t)+1)*x.dims], q, worst)
			if !full {
				continue // already farther than the k-th best
			}
			out = insertNeighbour(out, k, d, row)
			if len(out) == k {
				worst = out[k-1].Distance
			}
		}
		return out
	}
	e := q[nd.dim] - nd.split
	near, far := nd.lo, nd.hi
	if e > 0 {
		near, far = far, near
	}
	out = x.search(near, q, k, skip, out, off, rd)
	old := off[nd.dim]
	rdFar := rd - old*old + e*e
	if len(out) < k || rdFar <= out[k-1].Distance*boundSlack {
		off[nd.dim] = e
		out = x.search(far, q, k, skip, out, off, rdFar)
		off[nd.dim] = old
	}
	return out
}

// insertNeighbour puts row at squared distance d into out, kept sorted by
// (distance, row) and at most k long.
func insertNeighbour(out []Neighbour, k int, d float64, row int) []Neighbour {
	less := func(a Neighbour) bool { return d < a.Distance || (d == a.Distance && row < a.index) }
	if len(out) == k && !less(out[k-1]) {
		return out
	}
	pos := len(out)
	for pos > 0 && less(out[pos-1]) {
		pos--
	}
	if len(out) < k {
		out = append(out, Neighbour{})
	}
	copy(out[pos+1:], out[pos:len(out)-1])
	out[pos] = Neighbour{Distance: d, index: row}
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
