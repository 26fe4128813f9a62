package chain

import (
	"bytes"
	"encoding/binary"
	"hash/maphash"
	"strconv"
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

// labels numbers the state labels of a list in order of first
// appearance. While every label is a common prefix followed by a decimal
// integer in canonical form ("17", "s17"; the prefix is that of the first
// label), the integer indexes a table directly: one array access per
// label instead of a hash and a look at the arena, the fast path for the
// numbered states most files have. The table grows only while the values
// stay below max(2^20, 8 x the lines read) and 2^25 (128 MiB), so a file
// of a few huge numbers cannot make it large; the first label that does
// not fit moves every label seen so far, in order, into the general
// labelIndex, which then takes over.
type labels struct {
	fast   bool
	prefix []byte
	table  []int32  // index+1 by value; 0: not seen
	vals   []uint64 // value of label k on the fast path
	idx    *labelIndex
}

const maxLabelTable = 1 << 25

func newLabels() *labels { return &labels{idx: newLabelIndex()} }

func (t *labels) len() int {
	if t.fast {
		return len(t.vals)
	}
	return t.idx.len()
}

// number returns the value of b on the fast path, if b has the form.
func (t *labels) number(b []byte) (uint64, bool) {
	if len(b) <= len(t.prefix) || !bytes.Equal(b[:len(t.prefix)], t.prefix) {
		return 0, false
	}
	d := b[len(t.prefix):]
	if len(d) > 18 || d[0] == '0' && len(d) > 1 {
		return 0, false
	}
	var v uint64
	for _, c := range d {
		if c < '0' || c > '9' {
			return 0, false
		}
		v = v*10 + uint64(c-'0')
	}
	return v, true
}

// index returns the index of label b, adding it if new; lines is the
// number of lines read so far.
func (t *labels) index(b []byte, lines int) (int32, bool) {
	if t.idx.len() == 0 && !t.fast && len(t.vals) == 0 {
		// The first label decides the prefix.
		p := len(b)
		for p > 0 && b[p-1] >= '0' && b[p-1] <= '9' {
			p--
		}
		if p < len(b) {
			t.prefix = append([]byte(nil), b[:p]...)
			t.fast = true
		}
	}
	if t.fast {
		if v, ok := t.number(b); ok {
			if v >= uint64(len(t.table)) {
				lim := uint64(min(max(1<<20, 8*lines), maxLabelTable))
				if v < lim {
					n := uint64(max(1024, 2*len(t.table)))
					for n <= v {
						n *= 2
					}
					t.table = append(t.table, make([]int32, min(n, lim)-uint64(len(t.table)))...)
				}
			}
			if v < uint64(len(t.table)) {
				if e := t.table[v]; e != 0 {
					return e - 1, false
				}
				k := int32(len(t.vals))
				t.table[v] = k + 1
				t.vals = append(t.vals, v)
				return k, true
			}
		}
		t.leaveFast()
	}
	return t.idx.index(b)
}

// leaveFast moves the labels of the fast path into the general index.
func (t *labels) leaveFast() {
	var buf []byte
	for _, v := range t.vals {
		buf = strconv.AppendUint(append(buf[:0], t.prefix...), v, 10)
		t.idx.index(buf)
	}
	t.fast, t.table, t.vals = false, nil, nil
}

// strings returns the labels in index order.
func (t *labels) strings() []string {
	if !t.fast {
		return t.idx.strings()
	}
	var all []byte
	ends := make([]int, len(t.vals))
	for k, v := range t.vals {
		all = strconv.AppendUint(append(all, t.prefix...), v, 10)
		ends[k] = len(all)
	}
	s := string(all)
	out := make([]string, len(t.vals))
	start := 0
	for k, e := range ends {
		out[k] = s[start:e]
		start = e
	}
	return out
}
