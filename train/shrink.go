package train

import (
	"math"
)

// Shrinkage pulls a forest's probabilities toward the history's class
// shares,
//
//	p'_k = (1 - λ)·p_k + λ·π_k,   π_k = (n_k + 1)/(n + K)
//
// with λ fitted to the forest's own out-of-bag predictions by least
// log-loss. It is the m-estimate of a leaf's class frequencies (Cestnik,
// "Estimating probabilities: a crucial task in machine learning", ECAI
// 1990; used for tree probabilities by Zadrozny & Elkan, "Obtaining
// calibrated probability estimates from decision trees and naive Bayesian
// classifiers", ICML 2001; both cited from memory) taken over the whole
// forest. A small history makes more out-of-bag mistakes, so it gets a
// larger λ; and with λ ≥ MinShrink and every π_k > 0 no probability is
// ever exactly 0 or 1: a probability is never a guarantee.
type Shrinkage struct {
	Lambda float64   `json:"lambda"`
	Prior  []float64 `json:"prior"`
}

// MinShrink is the least λ: a thousandth of the weight on the class shares.
const MinShrink = 1e-3

// FitShrinkage fits λ on out-of-bag probabilities (rows of NaN, seen by
// every tree, are left out) by golden-section search of the mean log-loss
// over λ in [MinShrink, 0.9] (Kiefer, "Sequential minimax search for a
// maximum", 1953); the log-loss is convex in λ, so the search finds its
// minimum.
func FitShrinkage(y []int32, oob [][]float64, classes int) Shrinkage {
	if len(y) != len(oob) {
		panic("train: length mismatch")
	}
	s := Shrinkage{Prior: make([]float64, classes)}
	for _, v := range y {
		s.Prior[v]++
	}
	for k := range s.Prior {
		s.Prior[k] = (s.Prior[k] + 1) / float64(len(y)+classes)
	}
	loss := func(l float64) float64 {
		var sum float64
		n := 0
		for i, p := range oob {
			if math.IsNaN(p[0]) {
				continue
			}
			q := (1-l)*p[y[i]] + l*s.Prior[y[i]]
			sum -= math.Log(q)
			n++
		}
		if n == 0 {
			return 0
		}
		return sum / float64(n)
	}
	lo, hi := MinShrink, 0.9
	g := (math.Sqrt(5) - 1) / 2
	a, b := hi-g*(hi-lo), lo+g*(hi-lo)
	fa, fb := loss(a), loss(b)
	for range 60 {
		if fa < fb {
			hi, b, fb = b, a, fa
			a = hi - g*(hi-lo)
			fa = loss(a)
		} else {
			lo, a, fa = a, b, fb
			b = lo + g*(hi-lo)
			fb = loss(b)
		}
	}
	s.Lambda = (lo + hi) / 2
	if loss(MinShrink) <= loss(s.Lambda) {
		s.Lambda = MinShrink
	}
	return s
}

// Apply shrinks p in place and returns it. A zero Shrinkage (a model made
// before it existed) leaves p as it is.
func (s *Shrinkage) Apply(p []float64) []float64 {
	if s == nil || len(s.Prior) != len(p) {
		return p
	}
	for k := range p {
		p[k] = (1-s.Lambda)*p[k] + s.Lambda*s.Prior[k]
	}
	return p
}
