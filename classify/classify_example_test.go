package classify_test

import (
	"fmt"

	"github.com/spade-detect/spade/classify"
)

func ExampleParseInline() {
	d, err := classify.ParseInline("5k=111.8/0.10, 10k=129.0/0.17, 20k=147.5/0.23, id=60")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, r := range d.Readings {
		fmt.Printf("%d Hz: %.1f° × %.2f\n", r.Hz, r.Phase(), r.Amp())
	}
	fmt.Println("display ID", d.DisplayID)
	// Output:
	// 5000 Hz: 111.8° × 0.10
	// 10000 Hz: 129.0° × 0.17
	// 20000 Hz: 147.5° × 0.23
	// display ID 60
}

func ExampleParseValues() {
	v, _ := classify.ParseValues("values.toml", "cost_per_dig = 2\n[value]\n\"gold/ring\" = 300\nsilver = 40\ncoin = 15\n")
	for _, c := range []string{"gold/ring", "silver/coin", "bronze/coin", "iron/nail", "steel/ordnance"} {
		fmt.Printf("%-15s value %3.0f keeper %-5v hazard %v\n", c, v.ValueOf(c), v.IsKeeper(c), v.IsHazard(c))
	}
	// Output:
	// gold/ring       value 300 keeper true  hazard false
	// silver/coin     value  40 keeper true  hazard false
	// bronze/coin     value  15 keeper true  hazard false
	// iron/nail       value   0 keeper false hazard false
	// steel/ordnance  value   0 keeper false hazard true
}
