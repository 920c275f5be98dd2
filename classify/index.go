package classify

import (
	"github.com/spade-detect/spade/internal/kdtree"
)

// indexMinRows is the history length from which nearest uses the k-d
// index instead of the scan (kdtree.MinRows, measured with
// BenchmarkNearest).
const indexMinRows = kdtree.MinRows

// indexAfter is how many searches go by the scan before the index is
// built: building it costs about a hundred searches' saving at every size
// measured (128 µs at 300 digs, 0.9 ms at 2,000, 74 ms at 100,000), so a
// short run never pays for it. A model of format 5 holds its index, built
// when it was saved, and searches it from the first reading.
const indexAfter = 100

// kdIndex is the exact k-d tree (internal/kdtree) over the whitened
// training rows. Results equal the scan's to the bit, ties included
// (TestIndexEqualsScan).
type kdIndex struct{ *kdtree.Tree }

func newIndex(s *space) kdIndex { return kdIndex{kdtree.Build(s.ref, s.dims)} }

// nearest is space.nearest by the index.
func (x kdIndex) nearest(q []float64, k, skip int, out []Neighbour) []Neighbour {
	var buf [16]kdtree.Hit
	hits := buf[:0]
	if k > len(buf) {
		hits = make([]kdtree.Hit, 0, k)
	}
	hits = x.Nearest(q, k, skip, hits)
	out = out[:0]
	for _, h := range hits {
		out = append(out, Neighbour{Distance: h.Dist, index: h.Row})
	}
	return out
}
