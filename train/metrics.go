package train

import (
	"math"

	"github.com/sjwhitworth/golearn/evaluation"
)

// ClassMetrics are one class's figures.
type ClassMetrics struct {
	Precision float64 `json:"precision"`
	Recall    float64 `json:"recall"`
	F1        float64 `json:"f1"`
	Support   int     `json:"support"`
}

// ReliabilityBin is one row of the reliability table: predictions whose top
// probability falls in [Lo, Hi).
type ReliabilityBin struct {
	Lo         float64 `json:"lo"`
	Hi         float64 `json:"hi"`
	Count      int     `json:"count"`
	Confidence float64 `json:"confidence"` // mean top probability
	Accuracy   float64 `json:"accuracy"`   // share of those that were right
}

// Metrics are the figures of a set of probabilistic predictions.
type Metrics struct {
	Accuracy         float64                   `json:"accuracy"`
	BalancedAccuracy float64                   `json:"balanced_accuracy"`
	LogLoss          float64                   `json:"log_loss"`
	Brier            float64                   `json:"brier"`
	ECE              float64                   `json:"ece"`
	PerClass         map[string]ClassMetrics   `json:"per_class"`
	Confusion        map[string]map[string]int `json:"confusion"` // true class -> predicted class -> count
	Reliability      []ReliabilityBin          `json:"reliability"`
}

// logLossEps clips probabilities as scikit-learn's log_loss does for
// float64 input (its eps is the machine epsilon of the dtype since 1.3).
const logLossEps = 2.220446049250313e-16

// Score computes the figures of probabilities p (rows of class shares in
// class order) against true class indices y. Rows containing NaN (no
// out-of-bag vote) are left out. The confusion matrix and the per-class
// precision, recall and F1 come from golearn's evaluation package; a class
// never predicted gets precision 0, as scikit-learn's default does.
//
//	log-loss = -(1/N) Σ ln max(p_i,y_i, eps)
//	Brier    = (1/N) Σ_i Σ_k (p_ik - [y_i = k])²     (Brier 1950, all classes)
//	ECE      = Σ_b (n_b/N)·|accuracy_b - confidence_b|,  10 equal bins of the
//	           top probability (Naeini, Cooper & Hauskrecht, AAAI 2015;
//	           Guo et al., "On calibration of modern neural networks", 2017)
func Score(classes []string, y []int32, p [][]float64) Metrics {
	if len(y) != len(p) {
		panic("train: length mismatch")
	}
	K := len(classes)
	cm := evaluation.ConfusionMatrix{}
	for _, c := range classes {
		cm[c] = map[string]int{}
	}
	const bins = 10
	rel := make([]ReliabilityBin, bins)
	for b := range rel {
		rel[b].Lo, rel[b].Hi = float64(b)/bins, float64(b+1)/bins
	}
	var m Metrics
	n := 0
	correct := 0
	for i, row := range p {
		if len(row) != K {
			panic("train: length mismatch")
		}
		if math.IsNaN(row[0]) {
			continue
		}
		n++
		top := Argmax(row)
		cm[classes[y[i]]][classes[top]]++
		if int32(top) == y[i] {
			correct++
		}
		m.LogLoss -= math.Log(math.Max(row[y[i]], logLossEps))
		for k, v := range row {
			t := 0.0
			if int32(k) == y[i] {
				t = 1
			}
			m.Brier += (v - t) * (v - t)
		}
		b := min(int(row[top]*bins), bins-1)
		rel[b].Count++
		rel[b].Confidence += row[top]
		if int32(top) == y[i] {
			rel[b].Accuracy++
		}
	}
	if n == 0 {
		return m
	}
	m.Accuracy = float64(correct) / float64(n)
	m.LogLoss /= float64(n)
	m.Brier /= float64(n)
	for b := range rel {
		if rel[b].Count > 0 {
			c := float64(rel[b].Count)
			m.ECE += c / float64(n) * math.Abs(rel[b].Accuracy/c-rel[b].Confidence/c)
			rel[b].Confidence /= c
			rel[b].Accuracy /= c
		}
	}
	m.Reliability = rel
	m.PerClass = map[string]ClassMetrics{}
	present := 0
	for _, c := range classes {
		support := 0
		for _, v := range cm[c] {
			support += v
		}
		cl := ClassMetrics{
			Precision: zeroNaN(evaluation.GetPrecision(c, cm)),
			Recall:    zeroNaN(evaluation.GetRecall(c, cm)),
			F1:        zeroNaN(evaluation.GetF1Score(c, cm)),
			Support:   support,
		}
		m.PerClass[c] = cl
		if support > 0 {
			m.BalancedAccuracy += cl.Recall
			present++
		}
	}
	if present > 0 {
		m.BalancedAccuracy /= float64(present)
	}
	m.Confusion = cm
	return m
}

func zeroNaN(v float64) float64 {
	if math.IsNaN(v) {
		return 0
	}
	return v
}

// Argmax is the index of the largest value, the first on a tie: the top
// class of a row of probabilities.
func Argmax(p []float64) int {
	best := 0
	for k, v := range p {
		if v > p[best] {
			best = k
		}
	}
	return best
}
