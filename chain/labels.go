package chain

import (
	"bytes"
	"encoding/binary"
	"hash/maphash"
)

// labelIndex maps state labels to indices 0, 1, ... in order of first
// appearance. Each label is one record in a byte arena (4-byte index,
// uvarint length, the bytes), and the open-addressing table (linear
// probing) holds a 24-bit hash fingerprint and the record's offset in one
// uint64 per slot. A lookup so touches one slot and one arena run, there is
// no allocation per label and the garbage collector has no per-label
// pointers to trace: at a million states it is markedly cheaper than a
// map[string]int32 (measured: see the developer notes).
type labelIndex struct {
	seed  maphash.Seed
	slots []uint64 // fingerprint<<40 | (offset+1); 0 is empty
	arena []byte
	off   []int // record offset of label k (used only at the end)
}

const offBits = 40

func newLabelIndex() *labelIndex {
	return &labelIndex{seed: maphash.MakeSeed(), slots: make([]uint64, 1024)}
}

func (t *labelIndex) len() int { return len(t.off) }

// record returns the index and bytes of the record at offset o.
func (t *labelIndex) record(o int) (int32, []byte) {
	k := int32(binary.LittleEndian.Uint32(t.arena[o:]))
	n, w := binary.Uvarint(t.arena[o+4:])
	start := o + 4 + w
	return k, t.arena[start : start+int(n)]
}

func (t *labelIndex) label(k int32) []byte {
	_, b := t.record(t.off[k])
	return b
}

// index returns the index of label b, adding it if new.
func (t *labelIndex) index(b []byte) (k int32, added bool) {
	h := maphash.Bytes(t.seed, b)
	fp := h >> offBits
	mask := uint64(len(t.slots) - 1)
	for pos := h & mask; ; pos = (pos + 1) & mask {
		s := t.slots[pos]
		if s == 0 {
			k = int32(t.len())
			o := len(t.arena)
			t.arena = binary.LittleEndian.AppendUint32(t.arena, uint32(k))
			t.arena = binary.AppendUvarint(t.arena, uint64(len(b)))
			t.arena = append(t.arena, b...)
			t.off = append(t.off, o)
			t.slots[pos] = fp<<offBits | uint64(o+1)
			if 2*t.len() > len(t.slots) {
				t.grow()
			}
			return k, true
		}
		if s>>offBits == fp {
			kk, lb := t.record(int(s&(1<<offBits-1)) - 1)
			if bytes.Equal(lb, b) {
				return kk, false
			}
		}
	}
}

func (t *labelIndex) grow() {
	old := t.slots
	t.slots = make([]uint64, 2*len(old))
	mask := uint64(len(t.slots) - 1)
	for _, s := range old {
		if s == 0 {
			continue
		}
		_, b := t.record(int(s&(1<<offBits-1)) - 1)
		pos := maphash.Bytes(t.seed, b) & mask
		for t.slots[pos] != 0 {
			pos = (pos + 1) & mask
		}
		t.slots[pos] = s
	}
}

// strings returns the labels, all sharing one allocation.
func (t *labelIndex) strings() []string {
	all := string(t.arena)
	out := make([]string, t.len())
	for k, o := range t.off {
		n, w := binary.Uvarint(t.arena[o+4:])
		s := o + 4 + w
		out[k] = all[s : s+int(n)]
	}
	return out
}
