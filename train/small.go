package train

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/spade-detect/spade/features"
)

// SmallHistory is the size below which a history is called small: with
// fewer digs the held-out log-loss is still falling fast (measured on the
// demo world: 0.84 at 100 digs, 0.70 at 200, 0.62 at 1,000; see
// TestSmallHistoriesHonest).
const SmallHistory = 300

// FewDigs is the count below which a class is named as thinly learnt.
const FewDigs = 5

// ErrTooFewClasses is returned for a history with fewer than two classes.
var ErrTooFewClasses = errors.New("train: a model needs at least two classes to tell apart")

// HistoryNotes are what a user must know about the size of a history: how
// many digs, and the classes with fewer than FewDigs of them. Each is a
// sentence for the output itself, in every format.
func HistoryNotes(digs int, classCounts map[string]int) []string {
	var notes []string
	if digs < SmallHistory {
		notes = append(notes, fmt.Sprintf("small history: %d digs. Probabilities are drawn toward the class shares and are rough; they firm up with every labelled dig", digs))
	}
	var few []string
	for c, n := range classCounts {
		if n < FewDigs {
			few = append(few, fmt.Sprintf("%s (%d)", c, n))
		}
	}
	slices.Sort(few)
	if len(few) > 0 {
		notes = append(notes, fmt.Sprintf("classes with fewer than %d digs, which the model barely knows: %s", FewDigs, strings.Join(few, ", ")))
	}
	return notes
}

// Notes are what the user must know of the history a model learnt: its
// size, its thin classes (HistoryNotes), and labels that look like one
// thing spelt two ways (features.LabelNotes).
func Notes(b *Bundle, log *features.Log) []string {
	return append(HistoryNotes(b.Summary.Digs, b.Summary.ClassCounts), features.LabelNotes(log.Digs)...)
}

// ParseMaxSamples reads a bootstrap size for a history of n digs (train
// --max-samples): a count, or a fraction (a number with a point) of n,
// rounded, at least one, as scikit-learn's max_samples; 0 for all of them.
func ParseMaxSamples(s string, n int) (int, error) {
	if s == "" {
		return 0, nil
	}
	bad := fmt.Errorf("want a count of digs (such as 50000) or a fraction of the history above 0 and at most 1 (such as 0.2); got %q", s)
	if strings.ContainsAny(s, ".eE") {
		f, err := strconv.ParseFloat(s, 64)
		if err != nil || !(f > 0 && f <= 1) {
			return 0, bad
		}
		return max(1, int(math.Round(f*float64(n)))), nil
	}
	m, err := strconv.Atoi(s)
	if err != nil || m < 1 {
		return 0, bad
	}
	return m, nil
}
