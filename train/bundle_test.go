package train

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"hash/crc32"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/atomicfile"
)

func TestSaveLoadSameProbabilities(t *testing.T) {
	ds, _ := demo(t)
	b := trainSmall(t, 25, 4)
	path := filepath.Join(t.TempDir(), "m.spade")
	if err := b.Save(path); err != nil {
		t.Fatal(err)
	}
	got, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	x := make([]float64, len(ds.Names))
	for i := range ds.Rows() {
		x = ds.Row(i, x)
		p, q := b.Forest.Predict(x, nil), got.Forest.Predict(x, nil)
		for k := range p {
			if p[k] != q[k] {
				t.Fatalf("row %d class %d: %v before, %v after", i, k, p[k], q[k])
			}
		}
	}
	again, _ := got.Marshal()
	orig, _ := b.Marshal()
	if !bytes.Equal(again, orig) {
		t.Error("save -> load -> save changes the bytes")
	}
	if strings.Contains(string(orig), "Harrowmere") || strings.Contains(string(orig), "Sandle") {
		t.Error("the model file holds site names")
	}
}

func TestLoadRejectsDamage(t *testing.T) {
	good, err := trainSmall(t, 5, 1).Marshal()
	if err != nil {
		t.Fatal(err)
	}
	flip := bytes.Clone(good)
	flip[len(flip)/2] ^= 0x10
	newer := bytes.Clone(good)
	newer[8] = 9
	cases := []struct {
		name string
		data []byte
		want error
	}{
		{"empty", nil, ErrNotModel},
		{"foreign", []byte("dig,phase_5000,amp_5000\n1,2,3\n"), ErrNotModel},
		{"png", []byte("\x89PNG\r\n\x1a\n...."), ErrNotModel},
		{"truncated header", good[:12], ErrCorrupt},
		{"truncated", good[:len(good)-100], ErrCorrupt},
		{"bit flipped", flip, ErrCorrupt},
		{"trailing bytes", append(bytes.Clone(good), 0), ErrCorrupt},
		{"newer format", newer, ErrVersion},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Unmarshal(c.data)
			if !errors.Is(err, c.want) {
				t.Errorf("error %v, want %v", err, c.want)
			}
		})
	}
}

func TestInterruptedSaveKeepsPreviousModel(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "m.spade")
	b := trainSmall(t, 5, 1)
	if err := b.Save(path); err != nil {
		t.Fatal(err)
	}
	before, _ := os.ReadFile(path)
	// A write that dies half way (as a full disc or Ctrl-C would).
	boom := errors.New("disc full")
	err := atomicfile.Write(path, func(w io.Writer) error {
		w.Write(before[:len(before)/2])
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatalf("error %v", err)
	}
	after, _ := os.ReadFile(path)
	if !bytes.Equal(before, after) {
		t.Error("the previous model was changed")
	}
	if _, err := Load(path); err != nil {
		t.Errorf("previous model no longer loads: %v", err)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("temporary files left behind: %v", entries)
	}
}

// resign wraps a payload in a valid format 4 header and checksum, so the
// fuzzer gets past the checksum to the decoders.
func resign(payload []byte) []byte {
	var out bytes.Buffer
	out.WriteString(magic)
	out.Write([]byte{format4, 0, 0, 0})
	n := uint64(len(payload))
	for range 8 {
		out.WriteByte(byte(n))
		n >>= 8
	}
	out.Write(payload)
	return binary.LittleEndian.AppendUint32(out.Bytes(), crc32.Checksum(out.Bytes(), castagnoli))
}

func FuzzUnmarshal(f *testing.F) {
	// A small model (60 digs, 2 trees) keeps each run fast.
	ds, spec := demo(f)
	idx := make([]int, 60)
	for i := range idx {
		idx[i] = i * 20
	}
	small, err := TrainDataset(context.Background(), ds.Subset(idx), spec, TrainOptions{Forest: Options{Trees: 2, Seed: 1}})
	if err != nil {
		f.Fatal(err)
	}
	good, _ := small.Marshal()
	f.Add(good)
	// And one with an ordnance screen (2 trees on a 50-reading library).
	log, err := features.ReadLog(bytes.NewReader(datasets.DemoHistory), datasets.DemoHistoryName, features.ReadOptions{})
	if err != nil {
		f.Fatal(err)
	}
	log.Digs = log.Digs[:60]
	if err := small.AddScreen(context.Background(), log, ScreenOptions{Trees: 2, Library: 50}); err != nil || small.Screen == nil {
		f.Fatal(err)
	}
	screened, _ := small.Marshal()
	f.Add(screened)
	f.Add(encodeV3(small))
	f.Add(encodeV4(small))
	f.Add(good[:len(good)/2])
	f.Add(good[headerLen : len(good)-32])
	f.Add([]byte("SPADEMDL"))
	f.Fuzz(func(t *testing.T, data []byte) {
		// Format 5's decoder itself, as LoadWith calls it (no recover
		// around it, as Unmarshal has): any panic fails the run.
		for _, o := range []LoadOptions{{}, {NoOutOfBag: true, Whitened: true}} {
			if len(data) >= headerLen && binary.LittleEndian.Uint16(data[8:]) == format5 && string(data[:len(magic)]) == magic {
				own := aligned(uint64(len(data)))
				copy(own, reseal(data))
				decode5(own, o)
			}
		}
		for _, d := range [][]byte{data, resign(data), reseal(data)} {
			b, err := Unmarshal(d)
			if err != nil {
				if !errors.Is(err, ErrNotModel) && !errors.Is(err, ErrCorrupt) && !errors.Is(err, ErrVersion) {
					t.Fatalf("error without a cause: %v", err)
				}
				continue
			}
			// A file that loads must predict and save again.
			x := make([]float64, b.Spec.Len())
			b.Forest.Predict(x, nil)
			if b.Screen != nil {
				b.Screen.Score(x, 0, 0, nil)
				b.Screen.Score(x, 0, math.NaN(), nil)
			}
			if _, err := b.Marshal(); err != nil {
				t.Fatalf("re-marshal: %v", err)
			}
		}
	})
}
