package classify

import (
	"encoding/json"
	"fmt"
	"slices"
	"sort"
	"strconv"

	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// UnfamiliarPercentile is the novelty percentile above which a reading is
// "unfamiliar": less like the history than 99 % of the training digs are.
const UnfamiliarPercentile = 99

// Neighbours is how many nearest past digs a result lists.
const Neighbours = 3

// Classifier turns readings into results with one model and one values file.
// It is safe for use by one goroutine at a time.
type Classifier struct {
	bundle    *train.Bundle
	values    *Values
	space     *space
	reference []float64
	hazard    []bool
	worth     []float64
	vec, std  []float64
	probs     []float64
	nb        []Neighbour
}

// New prepares a classifier: the whitened training space and the training
// digs' own novelty scores (leave-one-out, at most 2000 of them). values nil means DefaultValues.
func New(b *train.Bundle, values *Values) *Classifier {
	if values == nil {
		values = DefaultValues()
	}
	c := &Classifier{bundle: b, values: values, space: newSpace(b.Training.Vectors)}
	c.reference = c.space.referenceScores()
	for _, cl := range b.Classes {
		c.hazard = append(c.hazard, values.IsHazard(cl))
		c.worth = append(c.worth, values.ValueOf(cl))
	}
	return c
}

// Clone is a classifier sharing this one's model, space and reference
// scores (read only) with scratch space of its own, for another goroutine.
func (c *Classifier) Clone() *Classifier {
	return &Classifier{bundle: c.bundle, values: c.values, space: c.space, reference: c.reference, hazard: c.hazard, worth: c.worth}
}

// Warnings are remarks about the model and values as a whole, for the user
// to read once: above all, when the model cannot warn of ordnance.
func (c *Classifier) Warnings() []string {
	var w []string
	if !slices.Contains(c.hazard, true) {
		w = append(w, fmt.Sprintf("none of this model's classes is hazardous by the values (%v), so it cannot warn of possible ordnance: a reading may still be one", c.values.Hazards))
	}
	return w
}

// ClassP is a class with its probability.
type ClassP struct {
	Class       string  `json:"class"`
	Probability float64 `json:"probability"`
}

// Novelty says how unlike the history a reading is.
type Novelty struct {
	Score      float64 `json:"score"`      // mean Mahalanobis distance to the 5 nearest past digs
	Percentile float64 `json:"percentile"` // share of training digs with a lower own score, percent
	Unfamiliar bool    `json:"unfamiliar"`
}

// Caution is the hazard warning. It comes first wherever it appears.
type Caution struct {
	Probability float64  `json:"probability"` // total over hazardous classes
	Classes     []string `json:"classes"`
	Message     string   `json:"message"`
}

// Decision is the dig decision by the user's values.
type Decision struct {
	ExpectedValue float64 `json:"expected_value"` // Σ p·value - cost per dig
	Verdict       string  `json:"verdict"`        // "dig", "skip", "unsure" or "do not dig"
	Note          string  `json:"note,omitempty"`
}

// Result is one reading's answer. Its JSON is classify's contract; the
// probabilities object lists the classes most probable first.
type Result struct {
	Dig           string             `json:"dig"`
	Probabilities map[string]float64 `json:"-"`
	Top           ClassP             `json:"top"`
	Ranked        []ClassP           `json:"-"` // the probabilities object is in this order
	Materials     []ClassP           `json:"materials"`
	Shapes        []ClassP           `json:"shapes"`
	Novelty       Novelty            `json:"novelty"`
	Caution       *Caution           `json:"caution"`
	Neighbours    []Neighbour        `json:"neighbours"`
	Decision      Decision           `json:"decision"`
}

// CautionMessage is said for every reading that could be ordnance.
const CautionMessage = "POSSIBLE ORDNANCE: do not dig. Mark the spot and report it to the authorities."

// Classify answers for one reading. The reading's frequencies must be the
// model's (a *features.FreqMismatchError otherwise).
func (c *Classifier) Classify(d *features.Dig) (*Result, error) {
	b := c.bundle
	var err error
	c.vec, _, err = b.Spec.Extract(d, c.vec)
	if err != nil {
		return nil, err
	}
	c.probs = b.Forest.Predict(c.vec, c.probs)
	c.std = c.space.standardise(c.vec, c.std)
	c.nb = c.space.nearest(c.std, max(noveltyK, Neighbours), -1, c.nb)

	r := &Result{Dig: d.ID, Probabilities: make(map[string]float64, len(b.Classes))}
	var hazardP, ev float64
	var hazards []string
	for k, cl := range b.Classes {
		p := c.probs[k]
		r.Probabilities[cl] = p
		r.Ranked = append(r.Ranked, ClassP{cl, p})
		ev += p * c.worth[k]
		if c.hazard[k] {
			hazardP += p
			if p > 0 {
				hazards = append(hazards, cl)
			}
		}
	}
	sort.SliceStable(r.Ranked, func(i, j int) bool { return r.Ranked[i].Probability > r.Ranked[j].Probability })
	r.Top = r.Ranked[0]
	r.Materials, r.Shapes = marginals(b.Classes, c.probs)

	score := meanDistance(c.nb)
	r.Novelty = Novelty{Score: score, Percentile: percentile(c.reference, score)}
	r.Novelty.Unfamiliar = r.Novelty.Percentile > UnfamiliarPercentile
	for _, n := range c.nb[:min(Neighbours, len(c.nb))] {
		n.Dig = b.Training.IDs[n.index]
		n.Class = b.Classes[b.Training.Y[n.index]]
		n.Date = b.Training.Dates[n.index]
		r.Neighbours = append(r.Neighbours, n)
	}

	// The caution: the hazardous classes' total probability, so that a
	// risk split over several hazard classes is not missed.
	if hazardP >= c.values.HazardThreshold && len(hazards) > 0 {
		r.Caution = &Caution{Probability: hazardP, Classes: hazards, Message: CautionMessage}
	}
	r.Decision.ExpectedValue = ev - c.values.CostPerDig
	// An unfamiliar reading is never called a dig: the history has nothing
	// like it, so the model cannot rule out a hazard there either.
	switch {
	case r.Caution != nil:
		r.Decision.Verdict = "do not dig"
	case r.Novelty.Unfamiliar:
		r.Decision.Verdict = "unsure"
	case r.Decision.ExpectedValue > 0:
		r.Decision.Verdict = "dig"
	default:
		r.Decision.Verdict = "skip"
	}
	if r.Novelty.Unfamiliar {
		r.Decision.Note = "unfamiliar: your history has nothing like this reading, so these probabilities are not to be trusted; look before you dig"
	}
	return r, nil
}

// marginals sums the joint probabilities per material and per shape.
func marginals(classes []string, p []float64) (materials, shapes []ClassP) {
	mp, sp := map[string]float64{}, map[string]float64{}
	for k, cl := range classes {
		m, s := features.SplitClass(cl)
		mp[m] += p[k]
		sp[s] += p[k]
	}
	return ranked(mp), ranked(sp)
}

func ranked(m map[string]float64) []ClassP {
	out := make([]ClassP, 0, len(m))
	for k, v := range m {
		out = append(out, ClassP{k, v})
	}
	sort.Slice(out, func(i, j int) bool {
		if out[i].Probability != out[j].Probability {
			return out[i].Probability > out[j].Probability
		}
		return out[i].Class < out[j].Class
	})
	return out
}

// probabilityObject writes ranked classes as one JSON object, in rank order,
// without the cost of sorting a map's keys for every reading.
type probabilityObject []ClassP

func (p probabilityObject) MarshalJSON() ([]byte, error) {
	b := []byte{'{'}
	for i, cp := range p {
		if i > 0 {
			b = append(b, ',')
		}
		key, err := json.Marshal(cp.Class)
		if err != nil {
			return nil, err
		}
		b = append(b, key...)
		b = append(b, ':')
		b = strconv.AppendFloat(b, cp.Probability, 'g', -1, 64)
	}
	return append(b, '}'), nil
}

// MarshalJSON writes the result with its probabilities as an object.
func (r *Result) MarshalJSON() ([]byte, error) {
	type plain Result
	return json.Marshal(struct {
		Dig           string            `json:"dig"`
		Probabilities probabilityObject `json:"probabilities"`
		*plain
	}{r.Dig, probabilityObject(r.Ranked), (*plain)(r)})
}
