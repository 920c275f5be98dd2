package features

import (
	"strconv"
	"strings"
)

// ListAnd writes items as a person lists them: "a", "a and b", "a, b and c".
// Messages use it instead of Go's "[a b c]".
func ListAnd(items []string) string {
	switch len(items) {
	case 0:
		return "none"
	case 1:
		return items[0]
	}
	return strings.Join(items[:len(items)-1], ", ") + " and " + items[len(items)-1]
}

// HzList writes frequencies in hertz as a person lists them, with the unit
// once: "5000, 10000 and 20000 Hz".
func HzList(hz []int) string {
	s := make([]string, len(hz))
	for i, f := range hz {
		s[i] = strconv.Itoa(f)
	}
	return ListAnd(s) + " Hz"
}

// Plural counts a noun as a person does: "1 dig", "2 digs".
func Plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return strconv.Itoa(n) + " " + noun + "s"
}
