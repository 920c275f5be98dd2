package classify

import (
	"encoding/json"
	"errors"
	"math"
	"reflect"
	"testing"

	"github.com/spade-detect/spade/datasets"
)

// FuzzInlineClassify: any inline reading is refused with ErrInline, refused
// by the model (wrong frequencies, a feature out of range), or classified
// with no NaN anywhere in the result and a result JSON can encode. Never a
// panic.
func FuzzInlineClassify(f *testing.F) {
	for _, s := range []string{
		"4.3k=111.8/0.10, 9.7k=129.0/0.17, 21.7k=147.5/0.23, 36.3k=163.2/0.26, id=60",
		"4.3k=20/0.5 9.7k=25/0.4 21.7k=30/0.3 36.3k=35/0.2 id=10 depth=40",
		"4.3k=170/1, 9.7k=120/1, 21.7k=70/1, 36.3k=20/1, id=50, g4.3k=1/0.01, g9.7k=1/0.01, g21.7k=1/0.01, g36.3k=1/0.01",
		"4.3k=111.8/1e200, 9.7k=129.0/0.17, 21.7k=147.5/0.23, 36.3k=163.2/0.26, id=60",
		"5k=1/1",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		b, _ := demoModel(t)
		d, err := ParseInline(s)
		if err != nil {
			if !errors.Is(err, ErrInline) {
				t.Fatalf("%q: error without its cause: %v", s, err)
			}
			return
		}
		r, err := New(b, nil).Classify(d)
		if err != nil {
			return
		}
		nums := []float64{r.Top.Probability, r.Novelty.Score, r.Novelty.Percentile, r.Hazard.Probability, r.Hazard.Screen, r.Hazard.History, r.Decision.ExpectedValue, r.Learn.Score}
		for _, p := range r.Probabilities {
			nums = append(nums, p)
		}
		for _, n := range r.Neighbours {
			nums = append(nums, n.Distance)
		}
		for _, v := range nums {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("%q: a number in the result is %v: %+v", s, v, r)
			}
		}
		if _, err := json.Marshal(r); err != nil {
			t.Fatalf("%q: %v", s, err)
		}
	})
}

// FuzzValues: a values file that parses gives the same values every time
// (so the same verdict), and every value is finite.
func FuzzValues(f *testing.F) {
	f.Add(string(datasets.DemoValues))
	f.Add("[value]\nGold = 300\ngold = 0\n")
	f.Add("hazard_threshold = 0.5\nkeep = [\"lead/shot\"]\n[value]\n\"gold / ring\" = 3\n")
	f.Add("cost_per_dig = nan\n")
	classes := []string{"gold/ring", "silver/coin", "lead/shot", "steel/ordnance", "iron/nail"}
	f.Fuzz(func(t *testing.T, text string) {
		v1, err1 := ParseValues("v.toml", text)
		v2, err2 := ParseValues("v.toml", text)
		if (err1 == nil) != (err2 == nil) || (err1 != nil && err1.Error() != err2.Error()) {
			t.Fatalf("two parses differ: %v / %v", err1, err2)
		}
		if err1 != nil {
			if !errors.Is(err1, ErrValues) {
				t.Fatalf("error without its cause: %v", err1)
			}
			return
		}
		if !reflect.DeepEqual(v1, v2) {
			t.Fatalf("two parses give %+v and %+v", v1, v2)
		}
		if CheckHazardThreshold(v1.HazardThreshold) != nil || math.IsNaN(v1.CostPerDig) {
			t.Fatalf("accepted threshold %v, cost %v", v1.HazardThreshold, v1.CostPerDig)
		}
		for _, c := range classes {
			if x := v1.ValueOf(c); math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("value of %s is %v", c, x)
			}
			if v1.IsKeeper(c) && v1.IsHazard(c) {
				t.Fatalf("%s is both keeper and hazard", c)
			}
		}
	})
}
