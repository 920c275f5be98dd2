// Package train grows spade's random forest on a dig history, evaluates it
// honestly against a single-number baseline, and stores it in a model bundle.
//
// # Why our own tree builder
//
// golearn's ensemble.RandomForest is not usable as shipped: its ID3 trees drop
// a float attribute after one split (base.DecomposeOnNumericAttributeThreshold),
// so each feature serves once per path; it draws features per tree, not per
// split; its bootstrap view pairs features and classes of different rows at
// the root; and meta.BaggedModel draws from the global math/rand in
// goroutines, so no seed makes it reproducible. On a 6-feature dig history it
// scored 0.22-0.58 where scikit-learn's forest scored 0.89.
//
// So the trees are grown here, by CART on the Gini impurity (Breiman,
// Friedman, Olshen & Stone, Classification and Regression Trees, 1984) over
// plain column arrays, in the random-forest scheme of Breiman ("Random
// forests", Machine Learning 45, 2001): a bootstrap per tree from the tree's
// own seeded generator, features sampled afresh at every split, a feature
// free to be split on again further down a path, attributes in a fixed order.
// The trees are emitted as golearn trees.DecisionTreeNode values, ClassDist at
// every node, and the tests check that golearn's own Predict on them agrees
// with ours; prediction itself runs on the forest compiled to flat arrays,
// which is what makes 50 µs a reading possible.
//
// # Probabilities
//
// A class's probability is the mean over trees of the leaf's class shares (a
// soft vote). Every training dig also gets out-of-bag probabilities, from the
// trees whose bootstrap left it out.
package train
