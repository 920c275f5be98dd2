package overlap

import (
	"encoding/json"
	"flag"
	"math"
	"os"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

var update = flag.Bool("update", false, "rewrite the golden file")

// handLog builds a log from (axis value, class index, count) triples.
func handLog(rows [][3]int) (axis []float64, y []int32) {
	for _, r := range rows {
		for range r[2] {
			axis = append(axis, float64(r[0]))
			y = append(y, int32(r[1]))
		}
	}
	return axis, y
}

var classes = []string{"aluminium/ring-pull", "gold/ring", "iron/fragment", "iron/nail"}

func TestSharesAndEntropyByHand(t *testing.T) {
	// Bin 60-61: 6 ring-pulls and 2 gold rings: shares 3/4 and 1/4, entropy
	// -(3/4 log2 3/4 + 1/4 log2 1/4) = 0.8113 bits: top share below 80 %,
	// so ambiguous. Bin 10-11: 8 nails, pure: 0 bits.
	axis, y := handLog([][3]int{{60, 0, 6}, {61, 1, 2}, {10, 3, 8}})
	r, err := Analyse("display_id", axis, classes, y, nil, Options{Width: 2})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Bins) != 2 {
		t.Fatalf("%d bins, want 2 (empty bins are left out)", len(r.Bins))
	}
	low, high := r.Bins[0], r.Bins[1]
	if low.From != 10 || low.To != 11 || low.Entropy != 0 || low.Ambiguous {
		t.Errorf("low bin %+v", low)
	}
	if high.From != 60 || high.To != 61 || !scalar.EqualWithinAbs(high.Entropy, 0.8112781244591328, 1e-12) || !high.Ambiguous {
		t.Errorf("high bin %+v", high)
	}
	if high.Classes[0].Class != "aluminium/ring-pull" || high.Classes[0].Share != 0.75 {
		t.Errorf("shares %+v", high.Classes)
	}
}

func TestRangeMerging(t *testing.T) {
	keep := Options{Width: 2, Keepers: []string{"gold/ring"}}
	cases := []struct {
		name   string
		rows   [][3]int
		ranges [][2]float64
	}{
		{"single bin", [][3]int{{60, 0, 5}, {60, 1, 5}}, [][2]float64{{60, 61}}},
		{"none", [][3]int{{10, 3, 9}, {60, 0, 9}, {62, 1, 9}}, nil},
		{"all ambiguous", [][3]int{{10, 2, 5}, {10, 3, 5}, {12, 2, 5}, {12, 3, 5}, {14, 2, 5}, {14, 3, 5}}, [][2]float64{{10, 15}}},
		{"two ranges split by a clean bin", [][3]int{{10, 2, 5}, {10, 3, 5}, {12, 3, 9}, {14, 0, 5}, {14, 1, 5}}, [][2]float64{{10, 11}, {14, 15}}},
		{"split by an empty bin", [][3]int{{10, 2, 5}, {10, 3, 5}, {14, 2, 5}, {14, 3, 5}}, [][2]float64{{10, 11}, {14, 15}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			axis, y := handLog(c.rows)
			r, err := Analyse("display_id", axis, classes, y, nil, keep)
			if err != nil {
				t.Fatal(err)
			}
			if len(r.Ranges) != len(c.ranges) {
				t.Fatalf("%d ranges, want %d: %+v", len(r.Ranges), len(c.ranges), r.Ranges)
			}
			for i, want := range c.ranges {
				if r.Ranges[i].From != want[0] || r.Ranges[i].To != want[1] {
					t.Errorf("range %d is %v-%v, want %v-%v", i, r.Ranges[i].From, r.Ranges[i].To, want[0], want[1])
				}
			}
		})
	}
}

func TestTrashOnlyAndChanceWords(t *testing.T) {
	// Between 84 and 89: 11 ring-pulls, 2 nails and 1 gold ring, every bin
	// mixed (top share 0.8, 0.75, 0.8 < 0.85): "1 in 14". At 20-21 only
	// iron collides: trash only.
	axis, y := handLog([][3]int{{84, 0, 4}, {84, 3, 1}, {86, 0, 3}, {86, 3, 1}, {88, 0, 4}, {88, 1, 1}, {20, 2, 5}, {20, 3, 5}})
	r, _ := Analyse("display_id", axis, classes, y, nil, Options{Width: 2, MinTopShare: 0.85, Keepers: []string{"gold/ring"}})
	if len(r.Ranges) != 2 {
		t.Fatalf("ranges %+v", r.Ranges)
	}
	iron, mixed := r.Ranges[0], r.Ranges[1]
	if !iron.TrashOnly || len(iron.Keepers) != 0 {
		t.Errorf("iron range %+v", iron)
	}
	if mixed.TrashOnly || len(mixed.Keepers) != 1 || mixed.Keepers[0].Words != "1 in 14 digs between 84 and 89 was gold/ring" {
		t.Errorf("mixed range %+v", mixed)
	}
}

func TestResolution(t *testing.T) {
	// Four digs in one ambiguous bin, two of each class. The majority rule
	// is right on half; a model sure of each is right on all, with entropy 0.
	axis := []float64{60, 60, 61, 61}
	y := []int32{0, 1, 0, 1}
	probs := [][]float64{{1, 0, 0, 0}, {0, 1, 0, 0}, {1, 0, 0, 0}, {0, 1, 0, 0}}
	r, _ := Analyse("display_id", axis, classes, y, probs, Options{Width: 2, Keepers: []string{"gold/ring"}})
	res := r.Ranges[0].Resolution
	if res.MajorityAccuracy != 0.5 || res.ModelAccuracy != 1 || res.EntropyBefore != 1 || res.EntropyAfter != 0 || res.TrashSkipped == nil || *res.TrashSkipped != 1 {
		t.Errorf("resolution %+v", res)
	}
}

func TestContinuousAxisBounds(t *testing.T) {
	// Phases are not whole numbers: bins are [from, from+width].
	r, _ := Analyse("phase_10000", []float64{120.5, 121.2, 125.9}, classes, []int32{0, 1, 0}, nil, Options{Width: 2})
	if r.Bins[0].From != 120 || r.Bins[0].To != 122 || math.Abs(r.Bins[1].From-124) > 1e-12 {
		t.Errorf("bins %+v", r.Bins)
	}
}

func TestGoldenJSON(t *testing.T) {
	axis, y := handLog([][3]int{{60, 0, 6}, {61, 1, 2}, {62, 0, 3}, {62, 1, 3}, {10, 3, 8}, {12, 2, 4}, {12, 3, 4}})
	probs := make([][]float64, len(y))
	for i, c := range y {
		probs[i] = []float64{0.05, 0.05, 0.05, 0.05}
		probs[i][c] = 0.85
	}
	r, _ := Analyse("display_id", axis, classes, y, probs, Options{Width: 2, Keepers: []string{"gold/ring"}})
	got, _ := json.MarshalIndent(r, "", "  ")
	const path = "../../testdata/golden/overlap-hand.json"
	if *update {
		os.WriteFile(path, append(got, '\n'), 0o644)
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if string(got)+"\n" != string(want) {
		t.Errorf("JSON differs from %s (go test ./classify/overlap -update rewrites it):\n%s", path, got)
	}
}

func TestNiceWidth(t *testing.T) {
	for raw, want := range map[float64]float64{0.3: 1, 1.7: 2, 2.2: 5, 7: 10, 13: 20} {
		if got := niceWidth(raw, true); got != want {
			t.Errorf("niceWidth(%v) = %v, want %v", raw, got, want)
		}
	}
	if got := niceWidth(0.3, false); got != 0.5 {
		t.Errorf("continuous 0.3 -> %v", got)
	}
}

// TestSmallLogIsNotOneBar: 50 digs over display IDs 0-99 were once binned
// 100 wide, one bar (issue 17). Now they get bins of 10, and a long log
// keeps about 30 digs a bin (1,500 digs over 0-99: 50 bins, width 2).
func TestSmallLogIsNotOneBar(t *testing.T) {
	for _, c := range []struct {
		n         int
		wantWidth float64
	}{{50, 10}, {20, 50}, {300, 10}, {1500, 2}} {
		var axis []float64
		var y []int32
		for i := range c.n {
			axis = append(axis, float64(i*99/(c.n-1)))
			y = append(y, int32(i%2))
		}
		r, err := Analyse("display_id", axis, classes, y, nil, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if r.Width != c.wantWidth {
			t.Errorf("%d digs over 0-99: width %g, want %g", c.n, r.Width, c.wantWidth)
		}
	}
}
