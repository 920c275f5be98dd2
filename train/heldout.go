package train

import (
	"errors"
	"fmt"
	"math"

	"github.com/spade-detect/spade/features"
)

// ErrOtherLog is HeldOut's refusal of a model trained on another log.
var ErrOtherLog = errors.New("the model was trained on another log")

// HeldOut gives each dig of log (ds is its table) the model's held-out
// probabilities over ds.Classes: the out-of-bag ones when the model was
// trained on that very dig, and the model's prediction for a dig it never
// saw, which is held out by construction. A training dig is matched by its
// id and by its readings: the same features and the same class. Two logs'
// ids collide easily (any two simulated logs, any logs without a dig
// column), and another log's out-of-bag figures would be another dig's, so
// a dig sharing an id with a training dig but not its features or class is
// ErrOtherLog. The notes say how many digs the model never saw.
func (b *Bundle) HeldOut(log *features.Log, ds *Dataset) ([][]float64, []string, error) {
	if err := b.Spec.CheckFreqs(log.Freqs); err != nil {
		return nil, nil, err
	}
	training := map[string]int{}
	for i, id := range b.Training.IDs {
		training[id] = i
	}
	// Map the model's classes onto the log's.
	idx := make([]int, len(b.Classes))
	for k, c := range b.Classes {
		idx[k] = -1
		for j, d := range ds.Classes {
			if c == d {
				idx[k] = j
			}
		}
	}
	probs := make([][]float64, len(log.Digs))
	var x []float64
	var err error
	collided, matched := 0, 0
	for i := range log.Digs {
		x, _, err = b.Spec.Extract(&log.Digs[i], x)
		if err != nil {
			return nil, nil, features.DigError(log.Name, &log.Digs[i], err)
		}
		var p []float64
		if j, ok := training[log.Digs[i].ID]; ok {
			if sameVector(x, b.Training.Vectors[j]) && b.Classes[b.Training.Y[j]] == ds.Classes[ds.Y[i]] {
				p = b.Training.OutOfBag[j]
				matched++
			} else {
				collided++
			}
		}
		if p == nil {
			p = b.Predict(x, nil)
		}
		probs[i] = make([]float64, len(ds.Classes))
		for k, v := range p {
			if idx[k] >= 0 {
				probs[i][idx[k]] = v
			}
		}
	}
	if collided > 0 {
		return nil, nil, fmt.Errorf("%w: %s of %s share an id with its training digs but not their readings or class", ErrOtherLog, features.Plural(collided, "dig"), log.Name)
	}
	var notes []string
	if unseen := len(log.Digs) - matched; unseen > 0 {
		notes = append(notes, fmt.Sprintf("%s of this log are not in the model's training digs: they are judged by the model's prediction, held out by construction", features.Plural(unseen, "dig")))
	}
	return probs, notes, nil
}

// sameVector reports whether two feature vectors are one dig's: equal to
// a part in 10¹² (a model file keeps its floats exactly; the slack is for
// a log written back with fewer digits).
func sameVector(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-12*math.Max(1, math.Abs(a[i])) {
			return false
		}
	}
	return true
}
