package train_test

import (
	"context"
	"fmt"

	"github.com/sjwhitworth/golearn/base"
	"github.com/spade-detect/spade/train"
)

func ExampleCrossValidate() {
	// Fisher's iris (UCI; golearn's copy), loaded with golearn's CSV parser:
	// 10-fold stratified cross-validation of a seeded forest.
	g, err := base.ParseCSVToInstances("../testdata/iris.csv", true)
	if err != nil {
		fmt.Println(err)
		return
	}
	ds, _ := train.FromInstances(g)
	ev, _ := train.CrossValidate(context.Background(), ds, train.EvalOptions{Folds: 10, Seed: 1, Forest: train.Options{Trees: 100}})
	fmt.Printf("%d rows, %d classes, accuracy %.2f\n", ev.Digs, len(ev.Classes), ev.Model.Accuracy)
	// Output:
	// 150 rows, 3 classes, accuracy 0.95
}
