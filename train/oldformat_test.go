package train

import (
	"bytes"
	"encoding/binary"
	"math"
)

// encodeForest writes a forest as formats 1 to 3 did, for the tests that
// check those files still load: each tree's nodes in preorder, a split as
// 0, the feature (uvarint) and the threshold (float64 bits), a leaf as 1
// and its (class, count) uvarint pairs.
func encodeForest(w *bytes.Buffer, f *Forest) {
	var buf [binary.MaxVarintLen64]byte
	uv := func(v uint64) { w.Write(buf[:binary.PutUvarint(buf[:], v)]) }
	uv(uint64(f.NumTrees()))
	for ti := range f.NumTrees() {
		t := f.Tree(ti)
		uv(uint64(t.Nodes()))
		var walk func(i int32)
		walk = func(i int32) {
			if t.Feature[i] < 0 {
				w.WriteByte(1)
				l := t.Left[i]
				uv(uint64(t.LeafStart[l+1] - t.LeafStart[l]))
				for j := t.LeafStart[l]; j < t.LeafStart[l+1]; j++ {
					uv(uint64(t.LeafClass[j]))
					uv(uint64(t.LeafCount[j]))
				}
				return
			}
			w.WriteByte(0)
			uv(uint64(t.Feature[i]))
			binary.Write(w, binary.LittleEndian, math.Float64bits(t.Threshold[i]))
			walk(t.Left[i])
			walk(t.Left[i] + 1)
		}
		walk(0)
	}
}
