package classify

import (
	"math"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"

	"github.com/spade-detect/spade/train"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

// Neighbour is a past dig near a reading in standardised feature space.
type Neighbour struct {
	Dig      string  `json:"dig"`
	Class    string  `json:"class"`
	Date     string  `json:"date,omitempty"`
	Distance float64 `json:"distance"`
	index    int
}

// space is the training digs' feature space whitened by the history's own
// mean and covariance: distance there is the Mahalanobis distance
// (Mahalanobis, "On the generalised distance in statistics", 1936), so no
// feature's unit dominates, and a reading whose features are each ordinary
// but whose pattern is not (phases that fall with frequency, where the
// history's always rise together) lies far from every past dig.
type space struct {
	dims  int
	mean  []float64
	white []float64 // dims×dims, row-major: W = Λ^(-1/2)·Qᵀ of the covariance QΛQᵀ
	ref   []float64 // row-major whitened training vectors
	// index is built at the indexAfter-th search of a history of at least
	// indexMinRows rows: the scan is faster below that length, and a run of
	// a few readings would not repay the build (BenchmarkNearest). A model
	// that holds its index (format 5) gives it here from the start, and
	// ref is then nil.
	index     kdIndex
	indexOnce sync.Once
	searches  atomic.Int64
}

// minEigenShare floors the covariance's eigenvalues, relative to the
// largest, so a direction the history never varies in (a constant feature)
// does not blow up.
const minEigenShare = 1e-9

func newSpace(vectors [][]float64, w *train.Whitening) *space {
	n := len(vectors)
	dims := len(vectors[0])
	s := &space{dims: dims, ref: make([]float64, n*dims)}
	if w != nil {
		s.mean, s.white = w.Mean, w.Matrix
	} else {
		s.mean, s.white = whitening(vectors)
	}
	// Rows are whitened on every core, each into its own place: at 100,000
	// digs this was 11 ms of classify's start-up on one.
	workers := min(runtime.GOMAXPROCS(0), 1+n/4096)
	var wg sync.WaitGroup
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := n * w / workers; i < n*(w+1)/workers; i++ {
				s.standardise(vectors[i], s.ref[i*dims:(i+1)*dims])
			}
		}()
	}
	wg.Wait()
	return s
}

// rowsMatrix is feature vectors read as a gonum matrix, without a copy.
type rowsMatrix [][]float64

func (m rowsMatrix) Dims() (r, c int)    { return len(m), len(m[0]) }
func (m rowsMatrix) At(i, j int) float64 { return m[i][j] }
func (m rowsMatrix) T() mat.Matrix       { return mat.Transpose{Matrix: m} }

// whitening is the vectors' mean and whitening matrix, which a model made
// by this spade stores (Prepare). The vectors are read in place
// (rowsMatrix), one column buffer reused: copying them into a matrix, a
// column at a time, made 30 MB of garbage at 100,000 digs.
func whitening(vectors [][]float64) (mean, white []float64) {
	n, dims := len(vectors), len(vectors[0])
	mean = make([]float64, dims)
	col := make([]float64, n)
	for j := range dims {
		for i, v := range vectors {
			col[i] = v[j]
		}
		mean[j] = stat.Mean(col, nil)
	}
	var cov mat.SymDense
	stat.CovarianceMatrix(&cov, rowsMatrix(vectors), nil)
	var eig mat.EigenSym
	white = make([]float64, dims*dims)
	if !eig.Factorize(&cov, true) {
		// No decomposition: fall back to per-feature standard deviations.
		for j := range dims {
			sd := math.Sqrt(cov.At(j, j))
			if sd <= 0 {
				sd = 1
			}
			white[j*dims+j] = 1 / sd
		}
	} else {
		var q mat.Dense
		eig.VectorsTo(&q)
		lambda := eig.Values(nil)
		top := slices.Max(lambda)
		for r := range dims {
			l := math.Max(lambda[r], top*minEigenShare)
			if l <= 0 {
				l = 1
			}
			for c := range dims {
				white[r*dims+c] = q.At(c, r) / math.Sqrt(l)
			}
		}
	}
	return mean, white
}

// standardise maps a feature vector into the whitened space.
func (s *space) standardise(v, dst []float64) []float64 {
	return train.Whitening{Mean: s.mean, Matrix: s.white}.Apply(v, dst)
}

// spaceOf is the bundle's neighbour space: the index a format 5 model
// holds, else its training vectors as they are when the loader has
// whitened them (LoadOptions.Whitened), else whitened here.
func spaceOf(b *train.Bundle) *space {
	t := &b.Training
	if w := b.Whitening; w != nil && t.Index != nil {
		return &space{dims: len(w.Mean), mean: w.Mean, white: w.Matrix, index: kdIndex{t.Index}}
	}
	if w := b.Whitening; b.VectorsWhitened() && w != nil && t.Flat() != nil {
		return &space{dims: len(w.Mean), mean: w.Mean, white: w.Matrix, ref: t.Flat()}
	}
	return newSpace(t.Vectors, b.Whitening)
}

// nearest finds the k training rows nearest to the standardised vector q,
// skipping row skip (-1 for none): by the k-d index on a long history, else
// by the scan. Both give the same rows and distances.
func (s *space) nearest(q []float64, k, skip int, out []Neighbour) []Neighbour {
	if s.ref == nil {
		return s.index.nearest(q, k, skip, out)
	}
	if len(s.ref) >= indexMinRows*s.dims && s.searches.Add(1) > indexAfter {
		s.indexOnce.Do(func() { s.index = newIndex(s) })
		return s.index.nearest(q, k, skip, out)
	}
	return s.scan(q, k, skip, out)
}

// scan is nearest by a linear scan that abandons a row as
// soon as its partial distance passes the current k-th best. Results are
// ordered by distance, then row, so ties are broken the same way every time.
func (s *space) scan(q []float64, k, skip int, out []Neighbour) []Neighbour {
	out = out[:0]
	worst := math.Inf(1)
	n := len(s.ref) / s.dims
	for i := range n {
		if i == skip {
			continue
		}
		row := s.ref[i*s.dims : (i+1)*s.dims]
		// Four terms between checks of the bound: cheaper than a branch a
		// term, and most rows are still abandoned within the first eight.
		var d float64
		j := 0
		for ; j+4 <= len(row); j += 4 {
			e0, e1, e2, e3 := row[j]-q[j], row[j+1]-q[j+1], row[j+2]-q[j+2], row[j+3]-q[j+3]
			d += e0*e0 + e1*e1 + e2*e2 + e3*e3
			if d > worst {
				break
			}
		}
		if d <= worst {
			for ; j < len(row); j++ {
				e := row[j] - q[j]
				d += e * e
			}
		}
		if d > worst || (len(out) == k && d == worst) {
			continue
		}
		// Insert in order; out stays sorted by (distance, index).
		pos := len(out)
		for pos > 0 && out[pos-1].Distance > d {
			pos--
		}
		if len(out) < k {
			out = append(out, Neighbour{})
		}
		copy(out[pos+1:], out[pos:len(out)-1])
		out[pos] = Neighbour{Distance: d, index: i}
		if len(out) == k {
			worst = out[k-1].Distance
		}
	}
	for i := range out {
		out[i].Distance = math.Sqrt(out[i].Distance)
	}
	return out
}

// noveltyK is how many nearest digs the novelty score averages.
const noveltyK = 5

// meanDistance is the mean distance of the first noveltyK neighbours.
func meanDistance(nb []Neighbour) float64 {
	nb = nb[:min(noveltyK, len(nb))]
	var s float64
	for _, n := range nb {
		s += n.Distance
	}
	return s / float64(len(nb))
}

// maxReference bounds how many training digs the reference distribution of
// scores is made from: evenly spaced, so it stays cheap on a long history.
const maxReference = 2000

// referenceScores are training digs' own novelty scores, each leaving
// itself out, sorted.
func (s *space) referenceScores() []float64 {
	ref := s.ref
	if ref == nil {
		// Only the index holds the rows (a format 5 model that stores no
		// scores, which this spade never writes): put them back in order.
		x := s.index.Tree
		ref = make([]float64, len(x.Points))
		for t, row := range x.Perm {
			copy(ref[int(row)*s.dims:], x.Points[t*s.dims:(t+1)*s.dims])
		}
	}
	n := len(ref) / s.dims
	step := max(1, (n+maxReference-1)/maxReference)
	var scores []float64
	buf := make([]Neighbour, 0, noveltyK)
	for i := 0; i < n; i += step {
		buf = s.nearest(ref[i*s.dims:(i+1)*s.dims], noveltyK, i, buf)
		scores = append(scores, meanDistance(buf))
	}
	slices.Sort(scores)
	return scores
}

// percentile is the share of reference scores at or below v, in percent.
func percentile(sorted []float64, v float64) float64 {
	i, found := slices.BinarySearch(sorted, v)
	for found && i < len(sorted) && sorted[i] == v {
		i++
	}
	return 100 * float64(i) / float64(len(sorted))
}
