package train

import (
	"errors"
	"fmt"
	"slices"
	"strings"
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
