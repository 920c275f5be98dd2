package train

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
)

// Tree is one grown tree in flat arrays. Node 0 is the root. A split node
// sends a row left when !(x[Feature] > Threshold), as golearn's
// DecisionTreeNode.Predict does (it goes to child "1" when the value is
// greater than SplitVal), so that NaN takes the same path in both.
type Tree struct {
	Feature   []int32   // -1 at a leaf
	Threshold []float64 // split value; unused at a leaf
	Left      []int32   // left child; the right child is Left+1; at a leaf, the leaf's index
	// LeafCounts holds, per leaf, the bootstrap-weighted class counts,
	// sparse: LeafStart[l]..LeafStart[l+1] index LeafClass and LeafCount.
	LeafStart []int32
	LeafClass []int32
	LeafCount []int32
}

// Nodes is the number of nodes.
func (t *Tree) Nodes() int { return len(t.Feature) }

// Leaf finds the leaf a row reaches.
func (t *Tree) Leaf(x []float64) int32 {
	i := int32(0)
	for t.Feature[i] >= 0 {
		if x[t.Feature[i]] > t.Threshold[i] {
			i = t.Left[i] + 1
		} else {
			i = t.Left[i]
		}
	}
	return t.Left[i]
}

// treeParams are the growing rules.
type treeParams struct {
	mtry        int // features tried per split
	minLeaf     int // least rows (counting bootstrap repeats) in a leaf
	maxDepth    int // 0: unlimited
	classes     int
	importances []float64 // impurity decrease per feature, added to
}

// grower holds one worker's scratch space.
type grower struct {
	ds     *Dataset
	p      treeParams
	rng    *rand.Rand
	weight []int32 // bootstrap multiplicity per row
	pairs  []valueRow
	perm   []int
	cl, cr []float64
	total  []float64
	t      *Tree
}

type valueRow struct {
	v   float64
	row int32
}

// growTree grows one tree on the rows with weight > 0.
func growTree(ds *Dataset, weight []int32, p treeParams, rng *rand.Rand) *Tree {
	g := &grower{ds: ds, p: p, rng: rng, weight: weight,
		perm: make([]int, len(ds.Cols)), cl: make([]float64, p.classes), cr: make([]float64, p.classes),
		total: make([]float64, p.classes), t: &Tree{LeafStart: []int32{0}}}
	rows := make([]int32, 0, len(weight))
	for i, w := range weight {
		if w > 0 {
			rows = append(rows, int32(i))
		}
	}
	g.pairs = make([]valueRow, len(rows))
	g.t.Feature = append(g.t.Feature, 0)
	g.t.Threshold = append(g.t.Threshold, 0)
	g.t.Left = append(g.t.Left, 0)
	g.grow(0, rows, 0)
	return g.t
}

// counts fills total with the weighted class counts of rows; returns the sum.
func (g *grower) counts(rows []int32) float64 {
	clear(g.total)
	var n float64
	for _, r := range rows {
		w := float64(g.weight[r])
		g.total[g.ds.Y[r]] += w
		n += w
	}
	return n
}

func (g *grower) grow(node int32, rows []int32, depth int) {
	n := g.counts(rows)
	pure := 0
	for _, c := range g.total {
		if c > 0 {
			pure++
		}
	}
	if pure <= 1 || n < float64(2*g.p.minLeaf) || (g.p.maxDepth > 0 && depth >= g.p.maxDepth) {
		g.leaf(node)
		return
	}
	f, thr, gain, ok := g.bestSplit(rows, n)
	if !ok {
		g.leaf(node)
		return
	}
	if g.p.importances != nil {
		g.p.importances[f] += gain
	}
	// Partition rows in place: left first.
	col := g.ds.Cols[f]
	i, j := 0, len(rows)-1
	for i <= j {
		if col[rows[i]] > thr {
			rows[i], rows[j] = rows[j], rows[i]
			j--
		} else {
			i++
		}
	}
	left := int32(len(g.t.Feature))
	g.t.Feature[node], g.t.Threshold[node], g.t.Left[node] = int32(f), thr, left
	g.t.Feature = append(g.t.Feature, 0, 0)
	g.t.Threshold = append(g.t.Threshold, 0, 0)
	g.t.Left = append(g.t.Left, 0, 0)
	g.grow(left, rows[:i], depth+1)
	g.grow(left+1, rows[i:], depth+1)
}

// leaf records the current g.total as the node's class counts.
func (g *grower) leaf(node int32) {
	t := g.t
	leaf := int32(len(t.LeafStart) - 1)
	for k, c := range g.total {
		if c > 0 {
			t.LeafClass = append(t.LeafClass, int32(k))
			t.LeafCount = append(t.LeafCount, int32(c))
		}
	}
	t.LeafStart = append(t.LeafStart, int32(len(t.LeafClass)))
	t.Feature[node], t.Left[node] = -1, leaf
}

// bestSplit searches mtry features drawn without replacement (more if none
// of those can split: the rule scikit-learn follows) for the threshold with
// the lowest weighted Gini impurity of the children. It returns the
// impurity decrease, weighted by the node's rows.
func (g *grower) bestSplit(rows []int32, n float64) (bestF int, bestThr, bestGain float64, ok bool) {
	for i := range g.perm {
		g.perm[i] = i
	}
	var parentSq float64
	for _, c := range g.total {
		parentSq += c * c
	}
	// Children's score Σc²/n, to be maximised; the parent's is the floor.
	bestScore := parentSq / n
	tried := 0
	for k := 0; k < len(g.perm) && (tried < g.p.mtry || !ok); k++ {
		j := k + g.rng.IntN(len(g.perm)-k)
		g.perm[k], g.perm[j] = g.perm[j], g.perm[k]
		f := g.perm[k]
		col := g.ds.Cols[f]
		pairs := g.pairs[:len(rows)]
		for i, r := range rows {
			pairs[i] = valueRow{col[r], r}
		}
		slices.SortFunc(pairs, func(a, b valueRow) int { return cmp.Compare(a.v, b.v) })
		if !(pairs[len(pairs)-1].v > pairs[0].v) {
			continue // constant here: does not count as tried
		}
		tried++
		clear(g.cl)
		copy(g.cr, g.total)
		var nl, sql float64
		nr, sqr := n, parentSq
		minLeaf := float64(g.p.minLeaf)
		for i := 0; i < len(pairs)-1; i++ {
			r := pairs[i].row
			w := float64(g.weight[r])
			y := g.ds.Y[r]
			sql += w * (2*g.cl[y] + w)
			sqr -= w * (2*g.cr[y] - w)
			g.cl[y] += w
			g.cr[y] -= w
			nl += w
			nr -= w
			if !(pairs[i+1].v > pairs[i].v) || nl < minLeaf || nr < minLeaf {
				continue
			}
			if score := sql/nl + sqr/nr; score > bestScore+1e-12*n {
				bestScore = score
				bestF = f
				bestThr = midpoint(pairs[i].v, pairs[i+1].v)
				ok = true
			}
		}
	}
	return bestF, bestThr, bestScore - parentSq/n, ok
}

// midpoint is a threshold strictly between a < b that sends a left and b
// right, as scikit-learn chooses it.
func midpoint(a, b float64) float64 {
	m := a/2 + b/2
	if !(m < b) || math.IsInf(m, 0) {
		return a
	}
	return m
}
