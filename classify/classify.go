package classify

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
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
	screenBuf []float64
	warnings  []string
	// unavailable is UnavailableNote when the model cannot warn, else "":
	// said in every result, so made once.
	unavailable string
}

// New prepares a classifier: the whitened training space and the training
// digs' own novelty scores (leave-one-out, at most 2000 of them; taken from
// the model when it stores them, see ReferenceScores). values nil means DefaultValues.
func New(b *train.Bundle, values *Values) *Classifier {
	if values == nil {
		values = DefaultValues()
	}
	c := &Classifier{bundle: b, values: values, space: spaceOf(b)}
	c.reference = b.NoveltyReference
	if c.reference == nil {
		c.reference = c.space.referenceScores()
	}
	for _, cl := range b.Classes {
		c.hazard = append(c.hazard, values.IsHazard(cl))
		c.worth = append(c.worth, values.ValueOf(cl))
	}
	if !c.HazardAvailable() {
		c.unavailable = UnavailableNote(b, values)
	}
	c.warnings = c.Warnings()
	return c
}

// Clone is a classifier sharing this one's model, space and reference
// scores (read only) with scratch space of its own, for another goroutine.
func (c *Classifier) Clone() *Classifier {
	return &Classifier{bundle: c.bundle, values: c.values, space: c.space, reference: c.reference, hazard: c.hazard, worth: c.worth, warnings: c.warnings, unavailable: c.unavailable}
}

// Warnings are remarks about the model and values as a whole, for the user
// to read once: above all, when the model cannot warn of ordnance.
func (c *Classifier) Warnings() []string {
	var w []string
	if c.unavailable != "" {
		w = append(w, c.unavailable)
	}
	return append(w, train.HistoryNotes(c.bundle.Summary.Digs, c.bundle.Summary.ClassCounts)...)
}

// HazardAvailable reports whether the model can warn of ordnance at all:
// it has the ordnance screen, or hazardous classes of the history's own.
func (c *Classifier) HazardAvailable() bool {
	return c.bundle.Screen != nil || slices.Contains(c.hazard, true)
}

// UnavailableNote says why a model cannot warn of ordnance.
func UnavailableNote(b *train.Bundle, v *Values) string {
	why := "it was made before spade had an ordnance screen; train it again with this spade"
	if b.Summary.NoScreen != "" {
		why = "it has no ordnance screen (" + b.Summary.NoScreen + ")"
	}
	return fmt.Sprintf("HAZARD CHECK UNAVAILABLE: this model cannot warn of possible ordnance: %s, and none of its classes is hazardous by the values (%s). A reading may still be ordnance", why, train.HazardNames(v.Hazards))
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
	Tier        string   `json:"tier"`        // TierLikely or TierPossible
	Probability float64  `json:"probability"` // Hazard.Probability
	Classes     []string `json:"classes"`     // the history's hazardous classes with a share, if any
	Message     string   `json:"message"`
}

// The tiers of the hazard check.
const (
	TierNone     = "none"
	TierPossible = "cannot be ruled out"
	TierLikely   = "likely ordnance"
)

// The two cautions, one per tier.
const (
	CautionLikely   = "LIKELY ORDNANCE: do not dig, do not touch. Mark the spot and report it to the police or the authorities."
	CautionPossible = "ORDNANCE CANNOT BE RULED OUT: do not dig until you have looked into the site's history and the signal. When in doubt, report it to the police or the authorities."
)

// CautionMessage is the caution of the higher tier.
const CautionMessage = CautionLikely

// HazardCheck is the ordnance check of one reading. It stands in every
// result, so that "no caution" is never read as "safe" where the check could
// not be made.
type HazardCheck struct {
	Available bool   `json:"available"`
	Tier      string `json:"tier"` // TierNone, TierPossible or TierLikely
	// Probability is the larger of History and Screen.
	Probability float64 `json:"probability"`
	// History is the history's own hazardous classes' total probability.
	History float64 `json:"history"`
	// Screen is the ordnance screen's score (see train.Screen): an alarm
	// level from the munitions library, not the chance of a shell.
	Screen     float64 `json:"screen"`
	ScreenUsed string  `json:"screen_used,omitempty"` // "depth", "phase and amplitude", or empty without a screen
	Note       string  `json:"note,omitempty"`
}

// Verdict is the dig decision, one of the constants below; its JSON and
// CSV form is the words themselves.
type Verdict string

// The verdicts.
const (
	VerdictDig      Verdict = "dig"
	VerdictSkip     Verdict = "skip"
	VerdictUnsure   Verdict = "unsure"
	VerdictDoNotDig Verdict = "do not dig"
	VerdictNone     Verdict = "no verdict"
)

// Learn is uncertainty sampling (Lewis & Gale, "A sequential algorithm for
// training text classifiers", SIGIR 1994): the digs whose class the model
// is least sure of are those whose labels teach it most. Score is one less
// the top class's probability; Worth marks a score of at least LearnAt
// on a reading with no caution (a hazard is never dug to learn).
type Learn struct {
	Score float64 `json:"score"`
	Worth bool    `json:"worth"`
}

// LearnAt is the least-confidence score from which a dig is worth making
// for what it teaches: the top class under a half.
const LearnAt = 0.5

// NoValuesNote says why a reading has no dig verdict.
const NoValuesNote = "no values file, so no dig verdict: give --values FILE with what finds are worth to you (see the README); the hazard check still applies, with any shape \"ordnance\" as the hazard"

// Decision is the dig decision by the user's values.
type Decision struct {
	ExpectedValue float64 `json:"expected_value"` // Σ p·value - cost per dig
	Verdict       Verdict `json:"verdict"`        // "dig", "skip", "unsure", "do not dig" or "no verdict"
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
	Hazard        HazardCheck        `json:"hazard_check"`
	Neighbours    []Neighbour        `json:"neighbours"`
	Decision      Decision           `json:"decision"`
	// Learn says how much the reading's answer would teach the model.
	Learn Learn `json:"learn"`
	// Warnings are the model's own (Classifier.Warnings), repeated in
	// every result so that no reader of one result misses them.
	Warnings []string `json:"warnings,omitempty"`
}

// ErrNotFinite is the cause when a reading's features are not all finite
// numbers: nothing sound can be said of it, so it is refused.
var ErrNotFinite = errors.New("the reading gives a feature that is not a finite number")

// Classify answers for one reading. The reading's frequencies must be the
// model's (a *features.FreqMismatchError otherwise).
func (c *Classifier) Classify(d *features.Dig) (*Result, error) {
	b := c.bundle
	var err error
	c.vec, _, err = b.Spec.Extract(d, c.vec)
	if err != nil {
		return nil, err
	}
	for i, v := range c.vec {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%w: %s is %v (a phase or amplitude out of range?)", ErrNotFinite, b.Spec.Names[i], v)
		}
	}
	c.probs = b.Predict(c.vec, c.probs)
	c.std = c.space.standardise(c.vec, c.std)
	c.nb = c.space.nearest(c.std, max(noveltyK, Neighbours), -1, c.nb)

	r := &Result{Dig: d.ID, Probabilities: make(map[string]float64, len(b.Classes)), Warnings: c.warnings}
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

	r.Novelty = c.novelty(meanDistance(c.nb))
	for _, n := range c.nb[:min(Neighbours, len(c.nb))] {
		n.Dig = b.Training.ID(n.index)
		n.Class = b.Classes[b.Training.Y[n.index]]
		n.Date = b.Training.Date(n.index)
		r.Neighbours = append(r.Neighbours, n)
	}
	// Ranked is a stable sort of the classes, so its first is Argmax's.
	r.Hazard = c.hazardCheck(d, hazardP, c.hazard[train.Argmax(c.probs)])
	if r.Hazard.Tier != TierNone {
		msg := CautionPossible
		if r.Hazard.Tier == TierLikely {
			msg = CautionLikely
		}
		r.Caution = &Caution{Tier: r.Hazard.Tier, Probability: r.Hazard.Probability, Classes: hazards, Message: msg}
	}
	r.Learn.Score = 1 - r.Top.Probability
	r.Learn.Worth = r.Learn.Score >= LearnAt && r.Caution == nil
	r.Decision.ExpectedValue = ev - c.values.CostPerDig
	// Fail safe: a caution is always "do not dig", and an unfamiliar
	// reading is never called a dig: the history has nothing like it, so
	// the model cannot rule out a hazard there either.
	switch {
	case r.Caution != nil:
		r.Decision.Verdict = VerdictDoNotDig
	case r.Novelty.Unfamiliar:
		r.Decision.Verdict = VerdictUnsure
	case !c.values.Given():
		r.Decision.Verdict = VerdictNone
		r.Decision.Note = NoValuesNote
	case r.Decision.ExpectedValue > 0:
		r.Decision.Verdict = VerdictDig
	default:
		r.Decision.Verdict = VerdictSkip
	}
	if r.Novelty.Unfamiliar {
		r.Decision.Note = "unfamiliar: your history has nothing like this reading, so these probabilities are not to be trusted; treat it as possibly hazardous and look before you dig"
	}
	return r, nil
}

// novelty places a score among the training digs' own. With too few digs
// to compare (a history of one dig has no neighbour to leave out) every
// reading is unfamiliar: fail safe, and never NaN.
func (c *Classifier) novelty(score float64) Novelty {
	if len(c.reference) == 0 || math.IsNaN(score) || math.IsInf(score, 0) {
		return Novelty{Score: 0, Percentile: 100, Unfamiliar: true}
	}
	n := Novelty{Score: score, Percentile: percentile(c.reference, score)}
	n.Unfamiliar = n.Percentile > UnfamiliarPercentile
	return n
}

// hazardCheck decides the tier from the history's own hazardous classes
// (their total probability hazardP, against the values' threshold; a
// majority is "likely") and from the ordnance screen (its own tiers). A
// hazardous top class is always at least "cannot be ruled out". Anything
// not a number counts as a hazard: the check fails safe.
func (c *Classifier) hazardCheck(d *features.Dig, hazardP float64, topHazard bool) HazardCheck {
	h := HazardCheck{Available: c.unavailable == "", Tier: TierNone, History: hazardP, Note: c.unavailable}
	tier := 0
	switch {
	case math.IsNaN(hazardP) || hazardP >= 0.5:
		tier = 2
	case topHazard || hazardP >= c.values.HazardThreshold:
		tier = 1
	}
	if s := c.bundle.Screen; s != nil {
		amp, size := train.ScreenExtras(d)
		var sr train.ScreenResult
		sr, c.screenBuf = s.Score(c.vec, amp, size, c.screenBuf)
		h.Screen = sr.Score
		h.ScreenUsed = "phase and amplitude"
		if sr.UsedDepth {
			h.ScreenUsed = "depth"
		}
		if math.IsNaN(sr.Score) {
			sr.Tier, h.Screen = 2, 1
		}
		tier = max(tier, sr.Tier)
	}
	if math.IsNaN(h.History) {
		h.History = 1
	}
	h.Probability = math.Max(h.History, h.Screen)
	switch tier {
	case 2:
		h.Tier = TierLikely
	case 1:
		h.Tier = TierPossible
	}
	return h
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

// Prepare stores in b what New would otherwise compute each time the model
// is loaded: the neighbour space's whitening and the training digs' novelty
// reference (ReferenceScores). A command that makes a model calls it before
// saving; the classifications are the same to the bit either way.
func Prepare(b *train.Bundle) {
	mean, white := whitening(b.Training.Vectors)
	b.Whitening = &train.Whitening{Mean: mean, Matrix: white}
	b.NoveltyReference = ReferenceScores(b)
}

// ReferenceScores are the training digs' own novelty scores (leave-one-out,
// at most 2000 of them, sorted) that New compares each reading with. A
// command that makes a model stores them in Bundle.NoveltyReference, so
// that loading the model does not compute them again: at 100,000 digs that
// took most of classify's start-up.
func ReferenceScores(b *train.Bundle) []float64 {
	s := spaceOf(b)
	ref := s.referenceScores()
	if ref == nil {
		ref = []float64{} // stored as such: "none" is not "not computed"
	}
	return ref
}

// Safety is what every summary of spade's (the root help, the demo, the
// season's report) says of the harm it can do: what a possible-ordnance
// caution asks, what comes first, and what a probability is not.
const Safety = "Safety: a possible-ordnance caution means do not dig and do not touch: mark the spot and report it to the police or the authorities. Permission, local law and heritage-reporting rules come first. A probability is never a guarantee."

// HazardStatus says whether a model can warn of ordnance, for every view
// of a model (train, inspect, evaluate), in every format.
type HazardStatus struct {
	Available bool          `json:"available"`
	Screen    *train.Screen `json:"screen,omitempty"`
	Text      string        `json:"text"`
}

// HazardStatusOf is a model's HazardStatus: its ordnance screen, else its
// history's own hazardous classes (any shape "ordnance"), else none.
func HazardStatusOf(b *train.Bundle) HazardStatus {
	if b.Screen != nil {
		return HazardStatus{Available: true, Screen: b.Screen, Text: b.Screen.Describe() + "."}
	}
	defaults := DefaultValues()
	for _, c := range b.Classes {
		if defaults.IsHazard(c) {
			return HazardStatus{Available: true, Text: "ordnance screen off: the hazard check rests on your history's own hazardous classes alone."}
		}
	}
	return HazardStatus{Text: UnavailableNote(b, defaults) + "."}
}
