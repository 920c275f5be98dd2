package classify

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
)

// randomSpace is a space over n random rows of dims columns; with ties,
// every row has a twin, so that order among equal distances is tested.
func randomSpace(n, dims int, seed uint64, ties bool) *space {
	r := rand.New(rand.NewPCG(seed, 1))
	vs := make([][]float64, n)
	for i := range vs {
		if ties && i%2 == 1 {
			vs[i] = vs[i-1]
			continue
		}
		v := make([]float64, dims)
		for j := range v {
			// Clustered and skewed, as phases and log-amplitudes are.
			v[j] = r.NormFloat64()*float64(1+j%3) + float64(r.IntN(4))
			if ties {
				v[j] = float64(r.IntN(5)) // a coarse grid: many equal distances
			}
		}
		vs[i] = v
	}
	return newSpace(vs, nil)
}

func TestIndexEqualsScan(t *testing.T) {
	// The k-d index must give exactly the scan's rows and distances (to
	// the bit, ties broken by row), for every k, with and without a row
	// left out, on random data (the test) and on a simulated log.
	cases := []struct {
		name string
		s    *space
	}{
		{"random 5000×14", randomSpace(5000, 14, 1, false)},
		{"random 3000×6 with ties", randomSpace(3000, 6, 2, true)},
		{"random 40×3", randomSpace(40, 3, 3, false)},
	}
	digs, _, err := datasets.Simulate(datasets.Options{N: 6000, Seed: 5})
	if err != nil {
		t.Fatal(err)
	}
	spec := features.NewSpec(datasets.DefaultFreqs, true)
	var vs [][]float64
	for i := range digs {
		if v, _, err := spec.Extract(&digs[i], nil); err == nil {
			vs = append(vs, v)
		}
	}
	cases = append(cases, struct {
		name string
		s    *space
	}{"simulated 6000", newSpace(vs, nil)})
	r := rand.New(rand.NewPCG(9, 9))
	for _, c := range cases {
		s := c.s
		x := newIndex(s)
		n := len(s.ref) / s.dims
		for trial := range 300 {
			var q []float64
			skip := -1
			if trial%2 == 0 {
				// A training row, itself left out (as the reference scores do).
				skip = r.IntN(n)
				q = s.ref[skip*s.dims : (skip+1)*s.dims]
			} else {
				// A row moved a little: a new reading near the history.
				q = append([]float64(nil), s.ref[r.IntN(n)*s.dims:][:s.dims]...)
				for j := range q {
					q[j] += r.NormFloat64() * 0.3
				}
			}
			for _, k := range []int{1, 3, 5, 12} {
				want := s.scan(q, k, skip, nil)
				got := x.nearest(q, k, skip, nil)
				if len(got) != len(want) {
					t.Fatalf("%s: k=%d: index gave %d rows, scan %d", c.name, k, len(got), len(want))
				}
				for i := range want {
					if got[i].index != want[i].index || got[i].Distance != want[i].Distance {
						t.Fatalf("%s: k=%d #%d: index row %d at %v, scan row %d at %v", c.name, k, i, got[i].index, got[i].Distance, want[i].index, want[i].Distance)
					}
				}
			}
		}
	}
}

// BenchmarkNearest: the five nearest past digs of a reading by the scan
// and by the k-d index, on simulated histories of 2,000, 5,000 and 100,000
// digs, in one run (issue 15).
func BenchmarkNearest(b *testing.B) {
	spec := features.NewSpec(datasets.DefaultFreqs, true)
	queries, _, err := datasets.Simulate(datasets.Options{N: 500, Seed: 77})
	if err != nil {
		b.Fatal(err)
	}
	for _, n := range []int{300, 1000, 2000, 5000, 100000} {
		digs, _, err := datasets.Simulate(datasets.Options{N: n, Seed: 42})
		if err != nil {
			b.Fatal(err)
		}
		var vs [][]float64
		for i := range digs {
			if v, _, err := spec.Extract(&digs[i], nil); err == nil {
				vs = append(vs, v)
			}
		}
		s := newSpace(vs, nil)
		x := newIndex(s)
		var qs [][]float64
		for i := range queries {
			if v, _, err := spec.Extract(&queries[i], nil); err == nil {
				qs = append(qs, s.standardise(v, nil))
			}
		}
		out := make([]Neighbour, 0, noveltyK)
		b.Run(fmt.Sprintf("digs=%d/scan", n), func(b *testing.B) {
			for i := range b.N {
				out = s.scan(qs[i%len(qs)], noveltyK, -1, out)
			}
		})
		b.Run(fmt.Sprintf("digs=%d/index", n), func(b *testing.B) {
			for i := range b.N {
				out = x.nearest(qs[i%len(qs)], noveltyK, -1, out)
			}
		})
		b.Run(fmt.Sprintf("digs=%d/build-index", n), func(b *testing.B) {
			for range b.N {
				newIndex(s)
			}
		})
	}
}
