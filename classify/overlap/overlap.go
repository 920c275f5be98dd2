package overlap

import (
	"fmt"
	"math"
	"slices"
	"sort"

	"github.com/spade-detect/spade/train"
	"gonum.org/v1/gonum/stat"
)

// Options for Analyse.
type Options struct {
	Width       float64  // bin width in the axis's units; 0 chooses one (AutoBins)
	MinTopShare float64  // a bin is ambiguous below this top-class share (default 0.8)
	MaxEntropy  float64  // or above this entropy in bits (default 1)
	Keepers     []string // classes worth digging
	Hazards     []string // classes never to dig
}

func (o Options) withDefaults() Options {
	if o.MinTopShare == 0 {
		o.MinTopShare = 0.8
	}
	if o.MaxEntropy == 0 {
		o.MaxEntropy = 1
	}
	return o
}

// Share is a class's share of the digs in a bin or range.
type Share struct {
	Class string  `json:"class"`
	Share float64 `json:"share"`
	Digs  int     `json:"digs"`
}

// Bin is one interval of the axis. From and To are inclusive bounds.
type Bin struct {
	From      float64 `json:"from"`
	To        float64 `json:"to"`
	Digs      int     `json:"digs"`
	Classes   []Share `json:"classes"` // largest share first
	Entropy   float64 `json:"entropy"` // bits
	Ambiguous bool    `json:"ambiguous"`
}

// Chance is a keeper's (or a hazard's) frequency in a range, in words.
type Chance struct {
	Class string  `json:"class"`
	Share float64 `json:"share"`
	OneIn int     `json:"one_in"`
	Words string  `json:"words"`
}

// Resolution says what the model buys in a range, on held-out predictions.
type Resolution struct {
	MajorityAccuracy float64 `json:"majority_accuracy"` // calling every dig its bin's top class
	ModelAccuracy    float64 `json:"model_accuracy"`
	EntropyBefore    float64 `json:"entropy_before"` // mean over digs of their bin's entropy, bits
	EntropyAfter     float64 `json:"entropy_after"`  // mean entropy of the model's probabilities, bits
	// TrashSkipped is the share of the range's trash digs the model could
	// have skipped there while keeping 99 % of its keepers (nil when the
	// range has no keepers or no trash).
	TrashSkipped *float64 `json:"trash_skipped_at_99"`
}

// Range is a run of adjacent ambiguous bins. From and To are inclusive.
type Range struct {
	From       float64     `json:"from"`
	To         float64     `json:"to"`
	Digs       int         `json:"digs"`
	Classes    []Share     `json:"classes"`
	Entropy    float64     `json:"entropy"`
	TrashOnly  bool        `json:"trash_only"` // only trash collides: skipping costs nothing
	Keepers    []Chance    `json:"keepers"`
	Hazards    []Chance    `json:"hazards"`
	Resolution *Resolution `json:"resolution,omitempty"`
}

// Result is the analysis. Its JSON is the overlap command's contract.
type Result struct {
	By          string  `json:"by"`
	Width       float64 `json:"width"`
	MinTopShare float64 `json:"min_top_share"`
	MaxEntropy  float64 `json:"max_entropy"`
	Digs        int     `json:"digs"`
	Bins        []Bin   `json:"bins"`
	Ranges      []Range `json:"ranges"`
	// Notes are what the reader must know about these ranges; the caller
	// sets them (a log of display IDs only, for one).
	Notes []string `json:"notes,omitempty"`
}

// Analyse bins the axis values of digs with true classes y (indices into
// classes). probs, when not nil, are held-out (cross-validated or
// out-of-bag) class probabilities per dig, for the resolution figures.
func Analyse(by string, axis []float64, classes []string, y []int32, probs [][]float64, o Options) (*Result, error) {
	if len(axis) != len(y) || (probs != nil && len(probs) != len(y)) {
		panic("overlap: length mismatch")
	}
	if len(axis) == 0 {
		return nil, fmt.Errorf("overlap: no digs")
	}
	o = o.withDefaults()
	lo, hi := slices.Min(axis), slices.Max(axis)
	integral := true
	for _, v := range axis {
		if v != math.Trunc(v) {
			integral = false
			break
		}
	}
	w := o.Width
	if w <= 0 {
		w = niceWidth((hi-lo)/AutoBins(len(axis)), integral)
	}
	if (hi-lo)/w > 100000 {
		return nil, fmt.Errorf("overlap: bin width %g gives more than 100000 bins", w)
	}
	K := len(classes)
	first := math.Floor(lo / w)
	nb := int(math.Floor(hi/w)-first) + 1
	counts := make([][]int, nb)
	for b := range counts {
		counts[b] = make([]int, K)
	}
	binOf := make([]int, len(axis))
	for i, v := range axis {
		b := int(math.Floor(v/w) - first)
		binOf[i] = b
		counts[b][y[i]]++
	}
	res := &Result{By: by, Width: w, MinTopShare: o.MinTopShare, MaxEntropy: o.MaxEntropy, Digs: len(axis)}
	bins := make([]*Bin, nb) // nil for an empty bin
	res.Bins = make([]Bin, 0, nb)
	for b := range nb {
		from := (first + float64(b)) * w
		to := from + w
		if integral && w == math.Trunc(w) {
			to = from + w - 1 // whole units: inclusive upper bound
		}
		bin := summarise(counts[b], classes)
		if bin.Digs == 0 {
			continue
		}
		bin.From, bin.To = from, to
		bin.Ambiguous = bin.Classes[0].Share < o.MinTopShare || bin.Entropy > o.MaxEntropy
		res.Bins = append(res.Bins, bin) // within capacity: pointers stay valid
		bins[b] = &res.Bins[len(res.Bins)-1]
	}
	keeper, hazard := make([]bool, K), make([]bool, K)
	for k, c := range classes {
		keeper[k] = slices.Contains(o.Keepers, c)
		hazard[k] = slices.Contains(o.Hazards, c)
	}
	for b := 0; b < nb; {
		if bins[b] == nil || !bins[b].Ambiguous {
			b++
			continue
		}
		start := b
		for b < nb && bins[b] != nil && bins[b].Ambiguous {
			b++
		}
		res.Ranges = append(res.Ranges, makeRange(start, b, bins, counts, classes, keeper, hazard, y, binOf, probs))
	}
	return res, nil
}

// summarise turns class counts into shares, largest first, and entropy.
func summarise(counts []int, classes []string) Bin {
	var bin Bin
	for _, c := range counts {
		bin.Digs += c
	}
	shares := make([]float64, 0, len(counts))
	for k, c := range counts {
		if c > 0 {
			s := float64(c) / float64(bin.Digs)
			bin.Classes = append(bin.Classes, Share{Class: classes[k], Share: s, Digs: c})
			shares = append(shares, s)
		}
	}
	sort.SliceStable(bin.Classes, func(i, j int) bool { return bin.Classes[i].Digs > bin.Classes[j].Digs })
	bin.Entropy = math.Abs(bits(shares)) // -0 for a pure bin
	return bin
}

func makeRange(start, end int, bins []*Bin, counts [][]int, classes []string, keeper, hazard []bool, y []int32, binOf []int, probs [][]float64) Range {
	K := len(classes)
	total := make([]int, K)
	for b := start; b < end; b++ {
		for k, c := range counts[b] {
			total[k] += c
		}
	}
	s := summarise(total, classes)
	r := Range{From: bins[start].From, To: bins[end-1].To, Digs: s.Digs, Classes: s.Classes, Entropy: s.Entropy, TrashOnly: true}
	for _, sh := range s.Classes {
		k := slices.Index(classes, sh.Class)
		if keeper[k] || hazard[k] {
			r.TrashOnly = false
		}
		switch {
		case keeper[k]:
			r.Keepers = append(r.Keepers, chance(sh, r))
		case hazard[k]:
			r.Hazards = append(r.Hazards, chance(sh, r))
		}
	}
	if probs != nil {
		r.Resolution = resolve(start, end, bins, classes, keeper, hazard, y, binOf, probs)
	}
	return r
}

// chance words a class's share of a range: "1 in 14 digs between 84 and 90
// was a gold ring".
func chance(sh Share, r Range) Chance {
	oneIn := int(math.Round(float64(r.Digs) / float64(sh.Digs)))
	return Chance{Class: sh.Class, Share: sh.Share, OneIn: oneIn,
		Words: fmt.Sprintf("1 in %d digs between %s and %s was %s", oneIn, num(r.From), num(r.To), sh.Class)}
}

func num(v float64) string { return fmt.Sprintf("%g", math.Round(v*100)/100) }

func resolve(start, end int, bins []*Bin, classes []string, keeper, hazard []bool, y []int32, binOf []int, probs [][]float64) *Resolution {
	res := &Resolution{}
	var n int
	var score []float64
	var isKeeper, isTrash []bool
	for i, b := range binOf {
		if b < start || b >= end {
			continue
		}
		n++
		bin := bins[b]
		if bin.Classes[0].Class == classes[y[i]] {
			res.MajorityAccuracy++
		}
		p := probs[i]
		top := 0
		for k, v := range p {
			if v > p[top] {
				top = k
			}
		}
		h := bits(p)
		if int32(top) == y[i] {
			res.ModelAccuracy++
		}
		res.EntropyBefore += bin.Entropy
		res.EntropyAfter += math.Abs(h)
		score = append(score, train.KeeperScore(p, keeper))
		isKeeper = append(isKeeper, keeper[y[i]])
		isTrash = append(isTrash, !keeper[y[i]] && !hazard[y[i]])
	}
	f := float64(n)
	res.MajorityAccuracy /= f
	res.ModelAccuracy /= f
	res.EntropyBefore /= f
	res.EntropyAfter /= f
	if slices.Contains(isKeeper, true) && slices.Contains(isTrash, true) {
		v := train.SavingCurve(score, isKeeper, isTrash, []float64{0.99})[0].TrashSkipped
		res.TrashSkipped = &v
	}
	return res
}

// AutoBins is how many bins the range of n digs is cut into when no width
// is given: about 30 digs a bin, but at least 10 bins where that leaves 5
// digs a bin or more, so that a small log is not one bar; a log of under
// 50 digs gets a bin per 5 digs. The width is then rounded up to a
// NiceStep, so there may be fewer.
func AutoBins(n int) float64 {
	bins := float64(n) / 30
	if bins < 10 {
		bins = min(10, max(1, float64(n)/5))
	}
	return bins
}

// NiceStep rounds raw up to 1, 2 or 5 times a power of ten, the steps a
// reader counts in (Heckbert, "Nice numbers for graph labels", Graphics
// Gems, 1990, cited from memory); 1 for a raw that is not positive.
func NiceStep(raw float64) float64 {
	if raw <= 0 || math.IsNaN(raw) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5} {
		if raw <= m*p {
			return m * p
		}
	}
	return 10 * p
}

// niceWidth is a bin width of NiceStep, at least 1 on a whole-number axis.
func niceWidth(raw float64, integral bool) float64 {
	w := NiceStep(raw)
	if integral && w < 1 {
		w = 1
	}
	return w
}

// bits is Shannon's entropy in bits, −Σ p log₂ p (Shannon 1948): gonum's
// stat.Entropy, in nats, over ln 2.
func bits(p []float64) float64 { return stat.Entropy(p) / math.Ln2 }
