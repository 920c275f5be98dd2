package train

import (
	"bytes"
	"context"
	"sync"
	"testing"

	"github.com/sjwhitworth/golearn/base"
	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
)

// iris loads Fisher's iris data (Fisher 1936, the UCI Machine Learning
// Repository copy as golearn ships it in examples/datasets/iris_headers.csv)
// with golearn's own CSV parser.
func iris(t testing.TB) *Dataset {
	g, err := base.ParseCSVToInstances("../testdata/iris.csv", true)
	if err != nil {
		t.Fatal(err)
	}
	ds, err := FromInstances(g)
	if err != nil {
		t.Fatal(err)
	}
	return ds
}

var demoOnce struct {
	sync.Once
	ds   *Dataset
	spec *features.FeatureSpec
}

// demo is the embedded demo history as a feature table.
func demo(t testing.TB) (*Dataset, *features.FeatureSpec) {
	demoOnce.Do(func() {
		log, err := features.ReadLog(bytes.NewReader(datasets.DemoHistory), datasets.DemoHistoryName, features.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		demoOnce.spec = features.NewSpec(log.Freqs, log.HasDisplayID)
		demoOnce.ds, err = FromLog(log, demoOnce.spec, features.LabelBoth)
		if err != nil {
			t.Fatal(err)
		}
	})
	return demoOnce.ds, demoOnce.spec
}

func trainSmall(t testing.TB, trees int, seed uint64) *Bundle {
	ds, spec := demo(t)
	b, err := TrainDataset(context.Background(), ds, spec, TrainOptions{Label: features.LabelBoth, Forest: Options{Trees: trees, Seed: seed}, Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	return b
}
