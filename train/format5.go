package train

import (
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"io"
	"math"
	"os"
	"sync"
	"sync/atomic"
	"unicode/utf8"
	"unsafe"

	"github.com/spade-detect/spade/internal/kdtree"
)

// Format 5 (issue 15) is laid out to be used where it lies: every array at
// an offset that is a multiple of 8, in the form it has in memory, so that
// a load is a memory map (LoadOptions.Mapped) or one read, and the arrays
// are views of those bytes, neither decoded nor copied. It also holds the
// neighbour index, built when the model is saved, in the whitened space
// classify searches:
//
//	magic "SPADEMDL" | version uint16 = 5 | reserved uint16 | payload length uint64
//	metadata length uint32 | section count uint32 | metadata (JSON)
//	zero bytes to a multiple of 8
//	sections: offset and length, uint64 each
//	block checksums: CRC-32C of each section's every MiB, section by
//	section, but of a forest's nodes, whose checksums are one a tree
//	head checksum: CRC-32C of everything before it, uint32
//	the sections, each at a multiple of 8, zero bytes between them, the
//	file ending with the last one
//
// The sections, in order, for the history's forest and then each of the
// screen's: the trees' first nodes (int32), the mixed leaves' classes and
// counts (int32 each) and the nodes (flatNode, 12 bytes); then the
// training digs' ids and dates, each as n+1 offsets (uint32) into their
// UTF-8 bytes; their classes (int32); vectors and out-of-bag probabilities
// (float64, row after row); and the neighbour index: the whitened vectors
// in the index's order (float64), which dig each is (int32) and its nodes
// (kdtree.Node, 24 bytes). The index's sections are empty in a model with
// no whitening. All little-endian.
//
// The checksums are by section and block so that a load checks, on every
// core, just the sections it uses: classify leaves out the out-of-bag
// probabilities and the vectors as they were (it searches the index), a
// quarter of a large model's file, which it then never reads.
const format5 = 5

// blockSize is the span of one block checksum.
const blockSize = 1 << 20

// Section numbers: forestSections for each forest, then the training's.
const (
	secRoots = iota
	secLeafCls
	secLeafCount
	secNodes
	forestSections
)

const (
	secIDOffsets = iota
	secIDs
	secDateOffsets
	secDates
	secY
	secVectors
	secOutOfBag
	secPoints
	secPerm
	secIndexNodes
	trainingSections
)

// maxSections bounds the count a file may claim: three forests.
const maxSections = 3*forestSections + trainingSections

// hostLittleEndian is whether this machine stores numbers as the file
// does; zeroCopy, whether arrays are views of the file's bytes (a test
// turns it off to run the copying path a big-endian machine takes).
var (
	hostLittleEndian = binary.NativeEndian.Uint16([]byte{1, 0}) == 1
	zeroCopy         = hostLittleEndian
)

// encode5 writes the model file from its metadata and the bundle's arrays.
func encode5(w io.Writer, b *Bundle, meta []byte) error {
	var secs [][]byte
	var spans [][]int // a nodes section's checksums are by tree: its trees' first bytes
	for _, f := range append([]*Forest{b.Forest}, b.Screen.forests()...) {
		ff := f.flat
		nodes := make([]byte, 0, 12*len(ff.nodes))
		for _, n := range ff.nodes {
			nodes = binary.LittleEndian.AppendUint32(nodes, n.lo)
			nodes = binary.LittleEndian.AppendUint32(nodes, n.hi)
			nodes = binary.LittleEndian.AppendUint32(nodes, n.kc)
		}
		secs = append(secs, int32Bytes(ff.roots), int32Bytes(ff.leafCls), int32Bytes(ff.leafCount), nodes)
		trees := make([]int, 0, len(ff.roots)+1)
		for _, r := range ff.roots {
			trees = append(trees, 12*int(r))
		}
		spans = append(spans, nil, nil, nil, append(trees, len(nodes)))
	}
	t := &b.Training
	ido, ids := stringBytes(t.IDs)
	do, dates := stringBytes(t.Dates)
	p := b.Spec.Len()
	flat := make([]float64, 0, len(t.Vectors)*p)
	for _, v := range t.Vectors {
		flat = append(flat, v...)
	}
	oob := make([]float64, 0, len(t.OutOfBag)*len(b.Classes))
	for _, v := range t.OutOfBag {
		oob = append(oob, v...)
	}
	secs = append(secs, ido, ids, do, dates, int32Bytes(t.Y), float64Bytes(flat), float64Bytes(oob))
	var points, perm, inodes []byte
	if x := b.neighbourIndex(flat); x != nil {
		points, perm = float64Bytes(x.Points), int32Bytes(x.Perm)
		for _, n := range x.Nodes {
			inodes = binary.LittleEndian.AppendUint64(inodes, math.Float64bits(n.Split))
			inodes = binary.LittleEndian.AppendUint32(inodes, uint32(n.Dim))
			inodes = binary.LittleEndian.AppendUint32(inodes, uint32(n.Lo))
			inodes = binary.LittleEndian.AppendUint32(inodes, uint32(n.Hi))
			inodes = binary.LittleEndian.AppendUint32(inodes, 0)
		}
	}
	secs = append(secs, points, perm, inodes)

	head := make([]byte, headerLen+8, 1<<12)
	copy(head, magic)
	binary.LittleEndian.PutUint16(head[8:], format5)
	binary.LittleEndian.PutUint32(head[headerLen:], uint32(len(meta)))
	binary.LittleEndian.PutUint32(head[headerLen+4:], uint32(len(secs)))
	head = pad8(append(head, meta...))
	for range trainingSections {
		spans = append(spans, nil)
	}
	for i, s := range secs {
		if spans[i] == nil {
			for lo := 0; lo < len(s); lo += blockSize {
				spans[i] = append(spans[i], lo)
			}
			spans[i] = append(spans[i], len(s))
		}
	}
	blocks := 0
	for _, sp := range spans {
		blocks += len(sp) - 1
	}
	at := align8(uint64(len(head) + 16*len(secs) + 4*blocks + 4))
	for _, s := range secs {
		head = binary.LittleEndian.AppendUint64(head, at)
		head = binary.LittleEndian.AppendUint64(head, uint64(len(s)))
		at = align8(at + uint64(len(s)))
	}
	for i, s := range secs {
		for j := range len(spans[i]) - 1 {
			head = binary.LittleEndian.AppendUint32(head, crc32.Checksum(s[spans[i][j]:spans[i][j+1]], castagnoli))
		}
	}
	if at-headerLen > maxModelBytes {
		return fmt.Errorf("the model would be %d MB, more than spade loads (%d MB); train on fewer digs, or with --max-samples", at>>20, maxModelBytes>>20)
	}
	binary.LittleEndian.PutUint64(head[12:], at-headerLen)
	head = binary.LittleEndian.AppendUint32(head, crc32.Checksum(head, castagnoli))
	for _, part := range append([][]byte{pad8(head)}, secs...) {
		if _, err := w.Write(pad8(part)); err != nil {
			return err
		}
	}
	return nil
}

// neighbourIndex is the k-d index of the training vectors (flat, row
// after row) whitened by the model's Whitening, as classify whitens them;
// nil without a whitening, or for a history too short for an index to
// beat the scan (kdtree.MinRows), whose vectors classify whitens itself.
func (b *Bundle) neighbourIndex(flat []float64) *kdtree.Tree {
	w := b.Whitening
	p := b.Spec.Len()
	if w == nil || len(flat) < kdtree.MinRows*p {
		return nil
	}
	white := make([]float64, len(flat))
	for i := 0; i < len(flat); i += p {
		w.Apply(flat[i:i+p], white[i:i+p])
	}
	return kdtree.Build(white, p)
}

func blocksOf(n uint64) int { return int((n + blockSize - 1) / blockSize) }

func align8(n uint64) uint64 { return (n + 7) &^ 7 }

// pad8 is p with zero bytes to a multiple of 8.
func pad8(p []byte) []byte {
	for len(p)%8 != 0 {
		p = append(p, 0)
	}
	return p
}

func int32Bytes(v []int32) []byte {
	out := make([]byte, 0, 4*len(v))
	for _, x := range v {
		out = binary.LittleEndian.AppendUint32(out, uint32(x))
	}
	return out
}

func float64Bytes(v []float64) []byte {
	out := make([]byte, 0, 8*len(v))
	for _, x := range v {
		out = binary.LittleEndian.AppendUint64(out, math.Float64bits(x))
	}
	return out
}

// stringBytes is strings as n+1 offsets (uint32) into their bytes.
func stringBytes(ss []string) (offsets, all []byte) {
	offsets = binary.LittleEndian.AppendUint32(nil, 0)
	for _, s := range ss {
		all = append(all, s...)
		offsets = binary.LittleEndian.AppendUint32(offsets, uint32(len(all)))
	}
	return offsets, all
}

// view is b's bytes as a []T, when they can be used in place: on a
// little-endian machine (zeroCopy), b at an address T may be read at. The
// loader's buffer and a memory map start at a multiple of 8, and every
// section does, so that is always so but in a test.
func view[T any](b []byte) ([]T, bool) {
	var t T
	size, align := int(unsafe.Sizeof(t)), uintptr(unsafe.Alignof(t))
	if len(b) == 0 {
		return nil, true
	}
	if !zeroCopy || uintptr(unsafe.Pointer(&b[0]))%align != 0 {
		return nil, false
	}
	return unsafe.Slice((*T)(unsafe.Pointer(&b[0])), len(b)/size), true
}

// viewOrDecode is view, or where that cannot be, each item decoded from
// its bytes (as many as it has in memory, which is the file's size of it
// for every type here).
func viewOrDecode[T any](b []byte, decode func(p []byte) T) []T {
	if v, ok := view[T](b); ok {
		return v
	}
	var t T
	size := int(unsafe.Sizeof(t))
	v := make([]T, len(b)/size)
	for i := range v {
		v[i] = decode(b[size*i:])
	}
	return v
}

func int32s(b []byte) []int32 {
	return viewOrDecode(b, func(p []byte) int32 { return int32(binary.LittleEndian.Uint32(p)) })
}

func float64s(b []byte) []float64 {
	return viewOrDecode(b, func(p []byte) float64 { return math.Float64frombits(binary.LittleEndian.Uint64(p)) })
}

func flatNodes(b []byte) []flatNode { return viewOrDecode(b, nodeAt) }

func indexNodes(b []byte) []kdtree.Node {
	return viewOrDecode(b, func(p []byte) kdtree.Node {
		return kdtree.Node{Split: math.Float64frombits(binary.LittleEndian.Uint64(p)),
			Dim: int32(binary.LittleEndian.Uint32(p[8:])), Lo: int32(binary.LittleEndian.Uint32(p[12:])), Hi: int32(binary.LittleEndian.Uint32(p[16:]))}
	})
}

// file5 is a format 5 file being read: its sections' bytes and checksums.
type file5 struct {
	secs   [][]byte
	blocks [][]byte // each section's block checksums, 4 bytes each
}

// parse5 checks a format 5 file's framing and head checksum and finds its
// sections. data is the whole file, at a multiple of 8 in memory.
func parse5(data []byte) (*file5, []byte, error) {
	if len(data) < headerLen+8 {
		return nil, nil, fmt.Errorf("%w: truncated (%d bytes)", ErrCorrupt, len(data))
	}
	if plen := binary.LittleEndian.Uint64(data[12:]); plen != uint64(len(data)-headerLen) {
		if plen > uint64(len(data)-headerLen) {
			return nil, nil, fmt.Errorf("%w: truncated (the header says %d bytes of payload, the file has %d)", ErrCorrupt, plen, len(data)-headerLen)
		}
		return nil, nil, fmt.Errorf("%w: %d bytes after the last section", ErrCorrupt, uint64(len(data)-headerLen)-plen)
	}
	mlen := uint64(binary.LittleEndian.Uint32(data[headerLen:]))
	nsec := uint64(binary.LittleEndian.Uint32(data[headerLen+4:]))
	metaEnd := headerLen + 8 + mlen
	tableEnd := align8(metaEnd) + 16*nsec
	if nsec > maxSections || tableEnd > uint64(len(data)) {
		return nil, nil, fmt.Errorf("%w: metadata of %d bytes and %d sections do not fit in the file", ErrCorrupt, mlen, nsec)
	}
	if nsec < forestSections+trainingSections || (nsec-trainingSections)%forestSections != 0 {
		return nil, nil, fmt.Errorf("%w: %d sections", ErrCorrupt, nsec)
	}
	f := &file5{secs: make([][]byte, nsec), blocks: make([][]byte, nsec)}
	at := tableEnd
	length := func(i uint64) uint64 { return binary.LittleEndian.Uint64(data[align8(metaEnd)+16*i+8:]) }
	for i := range uint64(nsec) {
		n := length(i)
		sums := uint64(blocksOf(n))
		if i < nsec-trainingSections && i%forestSections == secNodes {
			sums = length(i-secNodes+secRoots) / 4 // one a tree
		}
		if n > uint64(len(data)) || sums > (uint64(len(data))-at)/4 {
			return nil, nil, fmt.Errorf("%w: section %d's length %d does not fit in the file", ErrCorrupt, i, n)
		}
		f.blocks[i] = data[at : at+4*sums]
		at += 4 * sums
	}
	if at+4 > uint64(len(data)) {
		return nil, nil, fmt.Errorf("%w: truncated in the block checksums", ErrCorrupt)
	}
	if crc32.Checksum(data[:at], castagnoli) != binary.LittleEndian.Uint32(data[at:]) {
		return nil, nil, fmt.Errorf("%w: checksum mismatch (in the metadata or the section table)", ErrCorrupt)
	}
	// The sections follow one another, each at the next multiple of 8,
	// with zero bytes between (which no checksum covers).
	next := align8(at + 4)
	if next > uint64(len(data)) {
		return nil, nil, fmt.Errorf("%w: truncated after the head checksum", ErrCorrupt)
	}
	gaps := [][]byte{data[metaEnd:align8(metaEnd)], data[at+4 : next]}
	for i := range f.secs {
		row := data[align8(metaEnd)+16*uint64(i):]
		off, n := binary.LittleEndian.Uint64(row), binary.LittleEndian.Uint64(row[8:])
		if off != next || off > uint64(len(data)) || n > uint64(len(data))-off {
			return nil, nil, fmt.Errorf("%w: section %d at %d of %d bytes, out of place", ErrCorrupt, i, off, n)
		}
		f.secs[i] = data[off : off+n : off+n]
		gaps = append(gaps, data[off+n:min(uint64(len(data)), align8(off+n))])
		next = align8(off + n)
	}
	if next != uint64(len(data)) {
		return nil, nil, fmt.Errorf("%w: %d bytes after the last section", ErrCorrupt, uint64(len(data))-next)
	}
	for _, gap := range gaps {
		for _, c := range gap {
			if c != 0 {
				return nil, nil, fmt.Errorf("%w: padding not zero", ErrCorrupt)
			}
		}
	}
	return f, data[headerLen+8 : metaEnd], nil
}

// block is one block checksum's span: section sec's ith MiB.
type block struct{ sec, i int }

// blockList is the block checksums of the sections marked in want but the
// forests' nodes, whose checksums are by tree.
func (f *file5) blockList(want []bool) []block {
	var todo []block
	for s, w := range want {
		if !w || s < len(f.secs)-trainingSections && s%forestSections == secNodes {
			continue
		}
		for i := range blocksOf(uint64(len(f.secs[s]))) {
			todo = append(todo, block{s, i})
		}
	}
	return todo
}

// sumOK is whether block b matches its checksum.
func (f *file5) sumOK(b block) bool {
	s := f.secs[b.sec]
	lo := b.i * blockSize
	return crc32.Checksum(s[lo:min(len(s), lo+blockSize)], castagnoli) == binary.LittleEndian.Uint32(f.blocks[b.sec][4*b.i:])
}

// mismatch names the first section marked bad.
func mismatch(bad []atomic.Bool) error {
	for s := range bad {
		if bad[s].Load() {
			return fmt.Errorf("%w: checksum mismatch in section %d", ErrCorrupt, s)
		}
	}
	return nil
}

// decode5 reads a format 5 file (all of it in data, at a multiple of 8 in
// memory) into a bundle whose arrays are views of data where they can be.
// The forests' small sections are checked first, as the trees are found
// from them; then, on every core at once, the training digs are decoded,
// the other sections checked against their checksums, and each tree
// against its checksum and for its shape in one pass while it is in the
// cache (checked one pass after the other, the 52 MB of nodes at 100,000
// digs were read from memory twice). A damaged section is named before
// anything a decoder found wrong in it.
func decode5(data []byte, o LoadOptions) (*Bundle, error) {
	f, meta, err := parse5(data)
	if err != nil {
		return nil, err
	}
	b, err := decodeMetadata(meta, format5)
	if err != nil {
		return nil, err
	}
	t := &b.Training
	if t.IDs != nil || t.Dates != nil || t.Y != nil {
		return nil, fmt.Errorf("%w: training digs in the metadata of a format 5 file", ErrCorrupt)
	}
	nsec := len(f.secs)
	nforest := (nsec - trainingSections) / forestSections
	parts, err := b.screenParts(uint64(nforest - 1))
	if err != nil {
		return nil, fmt.Errorf("%w: screen: %w", ErrCorrupt, err)
	}
	tr := f.secs[nsec-trainingSections:]
	hasIndex := len(tr[secPoints]) > 0
	small, want := make([]bool, nsec), make([]bool, nsec)
	for i := range want {
		small[i] = i < nsec-trainingSections
		want[i] = !small[i]
	}
	wt := want[nsec-trainingSections:]
	wt[secOutOfBag] = !o.NoOutOfBag
	// Classify searches the index, and needs the vectors as they were only
	// where there is none.
	wt[secVectors] = !(o.Whitened && hasIndex)
	bad := make([]atomic.Bool, nsec)
	for _, bl := range f.blockList(small) {
		if !f.sumOK(bl) {
			bad[bl.sec].Store(true)
		}
	}
	if err := mismatch(bad); err != nil {
		return nil, err
	}
	features, classes := []int{b.Spec.Len()}, []int{len(b.Classes)}
	for _, sf := range parts {
		features, classes = append(features, len(sf.Names)), append(classes, screenClasses)
	}
	flats := make([]*flatForest, nforest)
	type tree struct{ forest, tree int }
	var trees []tree
	for i := range flats {
		if flats[i], err = flat5(f.secs[i*forestSections:(i+1)*forestSections], classes[i]); err != nil {
			return nil, fmt.Errorf("%w: forest %d: %w", ErrCorrupt, i, err)
		}
		for t := range flats[i].roots {
			trees = append(trees, tree{i, t})
		}
	}
	blocks := f.blockList(want)
	used := make([]treeUse, len(trees))
	errs := make([]error, len(trees))
	var trainErr error
	onEveryCore(1+len(blocks)+len(trees), func(j int, scratch *[]uint8) {
		switch {
		case j == 0:
			trainErr = b.decodeTraining5(tr, wt, hasIndex, o.Whitened)
		case j <= len(blocks):
			if bl := blocks[j-1]; !f.sumOK(bl) {
				bad[bl.sec].Store(true)
			}
		default:
			j -= 1 + len(blocks)
			i, t := trees[j].forest, trees[j].tree
			ff, s := flats[i], i*forestSections+secNodes
			lo, hi := ff.span(t)
			if crc32.Checksum(f.secs[s][12*lo:12*hi], castagnoli) != binary.LittleEndian.Uint32(f.blocks[s][4*t:]) {
				bad[s].Store(true)
				return
			}
			used[j], errs[j] = ff.checkOne(t, features[i], scratch)
		}
	})
	if err := mismatch(bad); err != nil {
		return nil, err
	}
	at := 0
	for i, ff := range flats {
		n := len(ff.roots)
		if err := errors.Join(errs[at : at+n]...); err != nil {
			return nil, fmt.Errorf("%w: forest %d: %w", ErrCorrupt, i, err)
		}
		if err := ff.leafShares(used[at : at+n]); err != nil {
			return nil, fmt.Errorf("%w: forest %d: %w", ErrCorrupt, i, err)
		}
		at += n
	}
	if trainErr != nil {
		return nil, fmt.Errorf("%w: training digs: %w", ErrCorrupt, trainErr)
	}
	for i, sf := range parts {
		sf.forest = &Forest{Names: sf.Names, Classes: screenClassNames, flat: flats[i+1]}
	}
	b.partial = !wt[secOutOfBag] || !wt[secVectors]
	return b, b.finish(&Forest{flat: flats[0]})
}

// flat5 is a forest's arrays from its four sections (the roots' checksum
// checked, the nodes' not yet), the trees' first nodes in order.
func flat5(secs [][]byte, K int) (*flatForest, error) {
	for i, size := range [forestSections]int{4, 4, 4, 12} {
		if len(secs[i])%size != 0 {
			return nil, fmt.Errorf("section %d is not whole %d-byte items", i, size)
		}
	}
	ff := &flatForest{K: K, roots: int32s(secs[secRoots]), leafCls: int32s(secs[secLeafCls]),
		leafCount: int32s(secs[secLeafCount]), nodes: flatNodes(secs[secNodes])}
	if len(ff.roots) == 0 || len(ff.nodes) < len(ff.roots) || len(ff.nodes) > math.MaxInt32 || len(ff.leafCls) != len(ff.leafCount) {
		return nil, fmt.Errorf("%d trees, %d nodes and %d and %d leaf shares", len(ff.roots), len(ff.nodes), len(ff.leafCls), len(ff.leafCount))
	}
	return ff, ff.checkRoots(len(ff.nodes))
}

// decodeTraining5 reads the training digs' sections; the vectors and the
// out-of-bag rows only where want says.
func (b *Bundle) decodeTraining5(secs [][]byte, want []bool, hasIndex, lean bool) error {
	t := &b.Training
	for _, s := range []int{secIDOffsets, secDateOffsets, secY, secPerm} {
		if len(secs[s])%4 != 0 {
			return fmt.Errorf("section %d is not whole 4-byte items", s)
		}
	}
	for _, s := range []int{secVectors, secOutOfBag, secPoints} {
		if len(secs[s])%8 != 0 {
			return fmt.Errorf("section %d is not whole 8-byte items", s)
		}
	}
	t.Y = int32s(secs[secY])
	n, p, K := len(t.Y), b.Spec.Len(), len(b.Classes)
	var err error
	if t.ids, err = strings5(secs[secIDOffsets], secs[secIDs], n); err != nil {
		return fmt.Errorf("ids: %w", err)
	}
	if t.dates, err = strings5(secs[secDateOffsets], secs[secDates], n); err != nil {
		return fmt.Errorf("dates: %w", err)
	}
	if !lean {
		t.IDs, t.Dates = t.ids.strings(), t.dates.strings()
		t.ids, t.dates = packed{}, packed{}
	}
	rows := func(sec, cols int) ([][]float64, []float64, error) {
		flat := float64s(secs[sec])
		if len(flat) != n*cols {
			return nil, nil, fmt.Errorf("section %d holds %d numbers, want %d rows of %d", sec, len(flat), n, cols)
		}
		r := make([][]float64, n)
		for i := range r {
			r[i] = flat[i*cols : (i+1)*cols : (i+1)*cols]
		}
		return r, flat, nil
	}
	if want[secVectors] {
		if t.Vectors, t.flat, err = rows(secVectors, p); err != nil {
			return err
		}
	}
	if want[secOutOfBag] {
		if t.OutOfBag, _, err = rows(secOutOfBag, K); err != nil {
			return err
		}
	}
	if !hasIndex {
		if len(secs[secPerm])+len(secs[secIndexNodes]) > 0 {
			return errors.New("a neighbour index without its points")
		}
		return nil
	}
	if b.Whitening == nil {
		return errors.New("a neighbour index but no whitening")
	}
	if len(secs[secIndexNodes])%24 != 0 {
		return errors.New("neighbour index nodes are not whole 24-byte items")
	}
	x := &kdtree.Tree{Dims: p, Points: float64s(secs[secPoints]), Perm: int32s(secs[secPerm]), Nodes: indexNodes(secs[secIndexNodes])}
	if err := x.Check(n, p); err != nil {
		return err
	}
	t.Index = x
	return nil
}

// strings5 is n strings from their n+1 offsets into all, checked: in
// order, within all, UTF-8. They are views of all's bytes where they can
// be.
func strings5(offsets, all []byte, n int) (packed, error) {
	if len(offsets) != 4*(n+1) {
		return packed{}, fmt.Errorf("%d offsets for %d digs", len(offsets)/4, n)
	}
	if !utf8.Valid(all) {
		return packed{}, errors.New("not UTF-8")
	}
	p := packed{all: string(all)}
	if _, ok := view[byte](all); ok && len(all) > 0 {
		p.all = unsafe.String(&all[0], len(all))
	}
	p.offsets = viewOrDecode(offsets, binary.LittleEndian.Uint32)
	// In order when no offset is below the one before: the differences'
	// sign bits, gathered without a branch.
	var back uint64
	for i := range n {
		back |= uint64(p.offsets[i+1]) - uint64(p.offsets[i])
	}
	if p.offsets[0] != 0 || back>>63 != 0 || int(p.offsets[n]) != len(all) {
		return packed{}, fmt.Errorf("offsets out of order or not ending at the %d bytes", len(all))
	}
	return p, nil
}

// strings is p as strings, views of its bytes.
func (p packed) strings() []string {
	out := make([]string, len(p.offsets)-1)
	for i := range out {
		out[i] = p.all[p.offsets[i]:p.offsets[i+1]]
	}
	return out
}

// load5 reads a format 5 file whose header (in head) is already read: a
// memory map when o.Mapped and the system has one, else one read into
// memory at a multiple of 8.
func load5(head []byte, f *os.File, plen uint64, o LoadOptions) (*Bundle, error) {
	size := headerLen + plen
	if st, err := f.Stat(); err == nil && st.Mode().IsRegular() {
		switch {
		case uint64(st.Size()) < size:
			return nil, fmt.Errorf("%w: truncated (the header says %d bytes of payload, the file has %d)", ErrCorrupt, plen, st.Size()-headerLen)
		case uint64(st.Size()) > size:
			return nil, fmt.Errorf("%w: %d bytes after the last section", ErrCorrupt, uint64(st.Size())-size)
		}
		if o.Mapped {
			if data, unmap, changed, err := mapFile(f, int(size)); err == nil {
				b, err := decode5(data, o)
				if err != nil {
					unmap()
					return nil, err
				}
				b.changed = changed
				return b, nil
			}
		}
		data := aligned(size)
		copy(data, head)
		if _, err := io.ReadFull(f, data[headerLen:]); err != nil {
			return nil, fmt.Errorf("%w: truncated: %w", ErrCorrupt, err)
		}
		return decode5(data, o)
	}
	// A pipe or a device: read what the header says, and one byte more.
	rest, err := io.ReadAll(io.LimitReader(f, int64(plen)+1))
	if err != nil {
		return nil, err
	}
	data := aligned(headerLen + uint64(len(rest)))
	copy(data, head)
	copy(data[headerLen:], rest)
	return decode5(data, o)
}

// addrRange is a mapping's start and length.
type addrRange struct{ start, size uintptr }

// mappings are the model files mapped now.
var mappings struct {
	sync.Mutex
	ranges []addrRange
}

// InMappedModel is whether addr lies in a model file mapped by a load
// (LoadOptions.Mapped): a fault there (see runtime/debug.SetPanicOnFault)
// means the file was cut short under it, not a bug.
func InMappedModel(addr uintptr) bool {
	mappings.Lock()
	defer mappings.Unlock()
	for _, m := range mappings.ranges {
		if addr-m.start < m.size {
			return true
		}
	}
	return false
}

// aligned is n zero bytes at a multiple of 8 in memory.
func aligned(n uint64) []byte {
	if n == 0 {
		return nil
	}
	words := make([]uint64, (n+7)/8)
	return unsafe.Slice((*byte)(unsafe.Pointer(&words[0])), n)
}
