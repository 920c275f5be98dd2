package overlap_test

import (
	"fmt"

	"github.com/spade-detect/spade/classify/overlap"
)

func ExampleAnalyse() {
	// Display IDs 60-63: ring-pulls with gold rings among them; 10-11:
	// nails. Bin 60-61 (4 ring-pulls, 1 gold ring) has a top share of
	// exactly 80 % and 0.72 bits, so it is not ambiguous; bin 62-63 (2 and
	// 1) has 67 % and 0.92 bits, so it is.
	axis := []float64{60, 60, 61, 61, 61, 62, 62, 63, 10, 10, 11}
	classes := []string{"aluminium/ring-pull", "gold/ring", "iron/nail"}
	y := []int32{0, 0, 0, 1, 0, 0, 1, 0, 2, 2, 2}
	r, _ := overlap.Analyse("display_id", axis, classes, y, nil, overlap.Options{Width: 2, Keepers: []string{"gold/ring"}})
	for _, rg := range r.Ranges {
		fmt.Printf("%g-%g: %d digs, %.2f bits\n", rg.From, rg.To, rg.Digs, rg.Entropy)
		for _, k := range rg.Keepers {
			fmt.Println(k.Words)
		}
	}
	// Output:
	// 62-63: 3 digs, 0.92 bits
	// 1 in 3 digs between 62 and 63 was gold/ring
}
