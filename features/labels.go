package features

import (
	"fmt"
	"slices"
)

// EditDistance is the Levenshtein distance between two strings, in runes
// (Levenshtein, "Binary codes capable of correcting deletions, insertions,
// and reversals", 1966).
func EditDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			sub := prev[j-1]
			if ra[i-1] != rb[j-1] {
				sub++
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, sub)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

// nearDuplicate reports whether two labels are likely one thing spelt two
// ways: singular and plural ("nail", "nails"), or one letter apart in
// words of four letters or more ("aluminum", "aluminium"), or two apart in
// words of eight or more. Shorter words are left alone: "tin" and "pin"
// are different things.
func nearDuplicate(a, b string) bool {
	if a == b {
		return false
	}
	for _, suffix := range []string{"s", "es"} {
		if a+suffix == b || b+suffix == a {
			return true
		}
	}
	n := min(len([]rune(a)), len([]rune(b)))
	d := EditDistance(a, b)
	return (n >= 4 && d == 1) || (n >= 8 && d == 2)
}

// LabelNotes names the materials and the shapes of a log that look like one
// thing spelt two ways, with their counts, for the user to correct: each
// spelling becomes a class of its own otherwise.
func LabelNotes(digs []Dig) []string {
	var notes []string
	for _, part := range []struct {
		what string
		of   func(*Dig) string
	}{{"materials", func(d *Dig) string { return d.Material }}, {"shapes", func(d *Dig) string { return d.Shape }}} {
		count := map[string]int{}
		for i := range digs {
			if v := part.of(&digs[i]); v != "" {
				count[v]++
			}
		}
		names := make([]string, 0, len(count))
		for n := range count {
			names = append(names, n)
		}
		slices.Sort(names)
		for i, a := range names {
			for _, b := range names[i+1:] {
				if nearDuplicate(a, b) {
					notes = append(notes, fmt.Sprintf("%s %q (%d digs) and %q (%d digs) look like one thing spelt two ways; if they are, correct the log, since each spelling is a class of its own", part.what, a, count[a], b, count[b]))
				}
			}
		}
	}
	return notes
}
