package train

import (
	"fmt"
	"sort"

	"github.com/sjwhitworth/golearn/base"
	"github.com/sjwhitworth/golearn/trees"
)

// Instances converts a table to golearn's base.DenseInstances: one
// FloatAttribute per feature, in the table's fixed order, and a categorical
// class attribute whose values are added in class order.
func (d *Dataset) Instances() (*base.DenseInstances, []base.Attribute, base.Attribute, error) {
	inst := base.NewDenseInstances()
	attrs := make([]base.Attribute, len(d.Names))
	specs := make([]base.AttributeSpec, len(d.Names))
	for f, name := range d.Names {
		a := base.NewFloatAttribute(name)
		attrs[f] = a
		specs[f] = inst.AddAttribute(a)
	}
	class := base.NewCategoricalAttribute()
	class.SetName("class")
	for _, c := range d.Classes {
		class.GetSysValFromString(c)
	}
	classSpec := inst.AddAttribute(class)
	if err := inst.AddClassAttribute(class); err != nil {
		return nil, nil, nil, fmt.Errorf("golearn refused the class attribute: %w", err)
	}
	if err := inst.Extend(d.Rows()); err != nil {
		return nil, nil, nil, fmt.Errorf("golearn could not allocate %d rows: %w", d.Rows(), err)
	}
	for i := range d.Rows() {
		for f := range d.Cols {
			inst.Set(specs[f], i, base.PackFloatToBytes(d.Cols[f][i]))
		}
		inst.Set(classSpec, i, class.GetSysValFromString(d.Classes[d.Y[i]]))
	}
	return inst, attrs, class, nil
}

// FromInstances reads a golearn table with float attributes and one class
// attribute into a Dataset (for data golearn loads, such as its CSV parser).
// The features come in the order of their names: golearn's CSV parser hands
// attributes back in a different order from run to run (measured: iris's
// columns swap places), and a forest sampling features per split must see
// them in a fixed order to be reproducible.
func FromInstances(g base.FixedDataGrid) (*Dataset, error) {
	classAttrs := g.AllClassAttributes()
	if len(classAttrs) != 1 {
		return nil, fmt.Errorf("train: want one class attribute, got %d", len(classAttrs))
	}
	attrs := base.NonClassAttributes(g)
	sort.SliceStable(attrs, func(i, j int) bool { return attrs[i].GetName() < attrs[j].GetName() })
	var names []string
	var specs []base.AttributeSpec
	for _, a := range attrs {
		if _, ok := a.(*base.FloatAttribute); !ok {
			return nil, fmt.Errorf("train: attribute %s is not numeric", a.GetName())
		}
		s, err := g.GetAttribute(a)
		if err != nil {
			return nil, err
		}
		names = append(names, a.GetName())
		specs = append(specs, s)
	}
	_, n := g.Size()
	rows := make([][]float64, n)
	labels := make([]string, n)
	for i := range n {
		rows[i] = make([]float64, len(specs))
		for f, s := range specs {
			rows[i][f] = base.UnpackBytesToFloat(g.Get(s, i))
		}
		labels[i] = base.GetClass(g, i)
	}
	return NewDataset(names, rows, labels), nil
}

// DecisionTree emits tree t as golearn's trees.DecisionTreeNode, with the
// class distribution at every node (an inner node's is the sum of its
// children's) and the majority class as Class. attrs are the feature
// attributes in the forest's order and classAttr the class attribute, as
// Dataset.Instances makes them. It is nil when tree t, read from a hostile
// model file, is not a tree (see Forest.Tree).
func (f *Forest) DecisionTree(t int, attrs []base.Attribute, classAttr base.Attribute) *trees.DecisionTreeNode {
	tr := f.Tree(t)
	if tr == nil {
		return nil
	}
	var build func(i int32) *trees.DecisionTreeNode
	build = func(i int32) *trees.DecisionTreeNode {
		n := &trees.DecisionTreeNode{ClassDist: map[string]int{}, ClassAttr: classAttr}
		if tr.Feature[i] < 0 {
			n.Type = trees.LeafNode
			l := tr.Left[i]
			for j := tr.LeafStart[l]; j < tr.LeafStart[l+1]; j++ {
				n.ClassDist[f.Classes[tr.LeafClass[j]]] = int(tr.LeafCount[j])
			}
		} else {
			n.Type = trees.RuleNode
			n.SplitRule = &trees.DecisionTreeRule{SplitAttr: attrs[tr.Feature[i]], SplitVal: tr.Threshold[i]}
			left, right := build(tr.Left[i]), build(tr.Left[i]+1)
			n.Children = map[string]*trees.DecisionTreeNode{"0": left, "1": right}
			for _, c := range []*trees.DecisionTreeNode{left, right} {
				for k, v := range c.ClassDist {
					n.ClassDist[k] += v
				}
			}
		}
		n.Class = majority(n.ClassDist, f.Classes)
		return n
	}
	return build(0)
}

// majority is the most frequent class, the first in class order on a tie.
func majority(dist map[string]int, classes []string) string {
	best, bestN := "", -1
	for _, c := range classes {
		if n := dist[c]; n > bestN {
			best, bestN = c, n
		}
	}
	return best
}
