package train

import (
	"math"
	"slices"
	"sort"
)

// Baseline is the single-number classifier spade is measured against: the
// one number a detector shows (the display ID, or the phase at one frequency
// when the log has none), cut into bins of equal counts on the training
// rows, with the class shares of each bin as its probabilities. It is the
// "learn your numbers by feel" rule, made exact.
type Baseline struct {
	Axis   string      `json:"axis"`
	Cuts   []float64   `json:"cuts"`   // ascending bin boundaries: bin b holds Cuts[b-1] <= v < Cuts[b]
	Shares [][]float64 `json:"shares"` // per bin, class shares
}

// baselineAlpha is the pseudo-count added per class and bin, so that a class
// unseen in a bin keeps a small probability and the log-loss stays finite.
const baselineAlpha = 0.5

// FitBaseline learns the bins on values v with classes y (K classes).
func FitBaseline(axis string, v []float64, y []int32, K int) *Baseline {
	n := len(v)
	bins := min(max(n/50, 4), 25)
	sorted := slices.Clone(v)
	slices.Sort(sorted)
	var cuts []float64
	for b := 1; b < bins; b++ {
		c := sorted[b*n/bins]
		if len(cuts) == 0 || c > cuts[len(cuts)-1] {
			if c > sorted[0] {
				cuts = append(cuts, c)
			}
		}
	}
	bl := &Baseline{Axis: axis, Cuts: cuts, Shares: make([][]float64, len(cuts)+1)}
	counts := make([][]float64, len(cuts)+1)
	for b := range counts {
		counts[b] = make([]float64, K)
	}
	for i, x := range v {
		counts[bl.bin(x)][y[i]]++
	}
	for b, c := range counts {
		var tot float64
		for _, x := range c {
			tot += x
		}
		bl.Shares[b] = make([]float64, K)
		for k, x := range c {
			bl.Shares[b][k] = (x + baselineAlpha) / (tot + baselineAlpha*float64(K))
		}
	}
	return bl
}

func (b *Baseline) bin(x float64) int {
	if math.IsNaN(x) {
		return 0
	}
	return sort.Search(len(b.Cuts), func(i int) bool { return x < b.Cuts[i] })
}

// Predict is the class shares of the bin x falls in.
func (b *Baseline) Predict(x float64) []float64 { return b.Shares[b.bin(x)] }

// BaselineAxis picks the single-number axis of a feature table: the display
// ID when there is one, else the phase at the lowest frequency.
func BaselineAxis(names []string) int {
	if i := slices.Index(names, "display_id"); i >= 0 {
		return i
	}
	for i, n := range names {
		if len(n) > 6 && n[:6] == "phase_" {
			return i
		}
	}
	return 0
}
