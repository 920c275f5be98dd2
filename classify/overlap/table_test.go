package overlap

import (
	"bytes"
	"strings"
	"testing"
)

// TestWriteTableSaysWhatCollides checks the table of a hand-made log: the
// range 60-61 where ring-pulls and gold rings collide, the gold ring's
// chance in words (2 of 8 digs: 1 in 4), the range's entropy (0.8 bits, by
// hand in TestSharesAndEntropyByHand), 80 columns, and the line that asks
// for keepers only when none were named.
func TestWriteTableSaysWhatCollides(t *testing.T) {
	axis, y := handLog([][3]int{{60, 0, 6}, {61, 1, 2}, {10, 3, 8}})
	for _, named := range []bool{true, false} {
		o := Options{Width: 2}
		if named {
			o.Keepers = []string{"gold/ring"}
		}
		r, err := Analyse("display_id", axis, classes, y, nil, o)
		if err != nil {
			t.Fatal(err)
		}
		var b bytes.Buffer
		r.WriteTable(&b, named)
		text := b.String()
		for _, want := range []string{"60 to 61: 8 digs, 0.8 bits", "aluminium/ring-pull 75%, gold/ring 25%"} {
			if !strings.Contains(text, want) {
				t.Errorf("keepers named %v: no %q in\n%s", named, want, text)
			}
		}
		if got := strings.Contains(text, "1 in 4"); got != named {
			t.Errorf("keepers named %v: the gold ring's chance said: %v\n%s", named, got, text)
		}
		if got := strings.Contains(text, "No keepers named"); got == named {
			t.Errorf("keepers named %v: the line asking for keepers said: %v", named, got)
		}
		for _, line := range strings.Split(text, "\n") {
			if n := len([]rune(line)); n > 80 {
				t.Errorf("a line of %d columns: %q", n, line)
			}
		}
	}
}
