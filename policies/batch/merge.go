package batch

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"
	"slices"
	"sort"
	"strconv"
	"strings"

	"ergostock/inventory/tabular"
)

// Part is one results file to merge: the output of one `batch --shard K/N`
// run.
type Part struct {
	Name string    // for messages
	R    io.Reader // its bytes
}

// MergeSummary says what Merge joined.
type MergeSummary struct {
	Parts, Items int
	Meta         Meta // of the merged file (shard 0/1)
}

// partRecord is one row of a part, with where it came from.
type partRecord struct {
	item int
	file string
	line int
	rec  []string
}

// readPart is what Merge needs of one part.
type readPart struct {
	name    string
	meta    *Meta
	bom     bool
	delim   rune
	header  []string
	records []partRecord
}

// Merge joins the parts of one catalogue run split by shards into the
// results file of the whole run, written to w in the parts' dialect: the
// header record once (with shard=0/1), the column header once, then every
// row in item order. The merged file of all N parts of a run is byte for
// byte the file the unsharded run writes.
//
// It refuses, with a one-line error naming the part file (and the line
// where one is at fault): a part without a header record (it cannot be
// checked), a workbook, a run digest, format, decimal mark, digits or
// delimiter that differs from the first part's, a column header that
// differs, shards that are not 0/N .. N-1/N each exactly once, a row whose
// item position is not a whole number or not of its part's shard, an item
// position given twice, and positions that do not cover 0..n-1 for the n
// rows given. Nothing is written to w unless every check passes.
func Merge(w io.Writer, parts []Part) (*MergeSummary, error) {
	if len(parts) == 0 {
		return nil, fmt.Errorf("no parts to merge: give the results files of the shards")
	}
	read := make([]*readPart, len(parts))
	for i, p := range parts {
		rp, err := readMergePart(p)
		if err != nil {
			return nil, err
		}
		read[i] = rp
	}
	first := read[0]
	for _, rp := range read[1:] {
		if err := sameRun(first, rp); err != nil {
			return nil, err
		}
	}
	if err := checkShards(read); err != nil {
		return nil, err
	}
	var all []partRecord
	for _, rp := range read {
		all = append(all, rp.records...)
	}
	sort.SliceStable(all, func(a, b int) bool { return all[a].item < all[b].item })
	n := len(all)
	for i := 1; i < n; i++ {
		if a, b := all[i-1], all[i]; a.item == b.item {
			return nil, fmt.Errorf("%s:%d: item %d is also on %s:%d: each item position must come once (a part given twice, or parts of two runs?)", b.file, b.line, b.item, a.file, a.line)
		}
	}
	// The positions must be 0..total-1, total the items file's item count
	// where the header record gives it, else the rows given.
	total := max(n, first.meta.ItemCount)
	if c := first.meta.ItemCount; c > 0 && n > 0 && all[n-1].item >= c {
		r := all[n-1]
		return nil, fmt.Errorf("%s:%d: item %d, but the items file has %d items (item_count=%d in the header record)", r.file, r.line, r.item, c, c)
	}
	byShard := map[int]string{}
	for _, rp := range read {
		byShard[rp.meta.Shard.K] = rp.name
	}
	for i := 0; i < total; i++ {
		if i < n && all[i].item == i {
			continue
		}
		sh := first.meta.Shard
		if sh.N < 1 {
			sh = Shard{K: 0, N: 1}
		}
		sh.K = i % sh.N
		return nil, fmt.Errorf("%s: no row for item %d (a position of its shard %s): the parts hold %d rows and want positions 0..%d exactly once (a part cut short, or edited?)",
			byShard[sh.K], i, sh, n, total-1)
	}

	m := *first.meta
	m.Shard = Shard{K: 0, N: 1}
	bw := bufio.NewWriter(w)
	if first.bom {
		bw.WriteString("\ufeff")
	}
	bw.WriteString(m.String() + "\n")
	cw := csv.NewWriter(bw)
	cw.Comma = first.delim
	cw.Write(first.header)
	for _, r := range all {
		cw.Write(r.rec)
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return nil, err
	}
	if err := bw.Flush(); err != nil {
		return nil, err
	}
	return &MergeSummary{Parts: len(parts), Items: n, Meta: m}, nil
}

// readMergePart reads one part through inventory/tabular, after its
// byte-order mark and header record.
func readMergePart(p Part) (*readPart, error) {
	br := bufio.NewReader(p.R)
	head, _ := br.Peek(4)
	if tabular.IsWorkbook(p.Name, head) {
		return nil, fmt.Errorf("%s: a workbook: merge joins CSV parts; run the shards with --out PART.csv", p.Name)
	}
	rp := &readPart{name: p.Name}
	if b, err := br.Peek(3); err == nil && string(b) == "\ufeff" {
		br.Discard(3)
		rp.bom = true
	}
	line, err := br.ReadString('\n')
	if err != nil && err != io.EOF {
		return nil, fmt.Errorf("%s: %w", p.Name, err)
	}
	if line == "" {
		return nil, fmt.Errorf("%s: empty file: want a results file of ergostock batch", p.Name)
	}
	if !strings.HasPrefix(line, "#") {
		return nil, fmt.Errorf("%s:1: no header record (a line starting %q): merge checks the parts' run digest and shard there; write the parts with this ergostock", p.Name, MetaPrefix)
	}
	m, err := ParseMeta(line, p.Name, 1)
	if err != nil {
		return nil, err
	}
	rp.meta = m
	// A blank line stands in for the header record, so that the table
	// reader's line numbers are the file's.
	tr, err := tabular.NewReader(io.MultiReader(strings.NewReader("\n"), br), p.Name, tabular.Options{})
	if err != nil {
		return nil, err
	}
	rp.delim = tr.Dialect.Delimiter
	rp.header = tr.Header
	itemCol := slices.Index(tr.Header, "item")
	if itemCol < 0 {
		return nil, fmt.Errorf("%s:%d: no item column in the header: want the results header of ergostock batch", p.Name, tr.HeaderLine)
	}
	for {
		rec, line, err := tr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		cell := strings.TrimSpace(rec[itemCol])
		item, err := strconv.Atoi(cell)
		if err != nil || item < 0 {
			return nil, fmt.Errorf("%s:%d: item %q: want the item's position, a whole number >= 0", p.Name, line, cell)
		}
		if !m.Shard.Contains(item) {
			return nil, fmt.Errorf("%s:%d: item %d is not a position of the part's shard %s (header record): want positions %d, %d, ...", p.Name, line, item, m.Shard, m.Shard.K, m.Shard.K+m.Shard.N)
		}
		rp.records = append(rp.records, partRecord{item: item, file: p.Name, line: line, rec: slices.Clone(rec)})
	}
	return rp, nil
}

// sameRun refuses a part that is not of the first part's run and dialect.
func sameRun(a, b *readPart) error {
	ma, mb := a.meta, b.meta
	differ := func(what, va, vb string) error {
		return fmt.Errorf("%s:1: %s %s, but %s has %s: want the parts of one run (batch with the same items, history and options)", b.name, what, vb, a.name, va)
	}
	switch {
	case mb.Run != ma.Run:
		return differ("run digest", ma.Run, mb.Run)
	case mb.Format != ma.Format:
		return differ("results format", "v"+strconv.Itoa(ma.Format), "v"+strconv.Itoa(mb.Format))
	case mb.ItemCount != ma.ItemCount:
		return differ("item_count", strconv.Itoa(ma.ItemCount), strconv.Itoa(mb.ItemCount))
	case mb.Period != ma.Period:
		return differ("period", ma.Period, mb.Period)
	case mb.Cells.decimal() != ma.Cells.decimal():
		return differ("decimal mark", string(ma.Cells.decimal()), string(mb.Cells.decimal()))
	case mb.Cells.Digits != ma.Cells.Digits:
		return differ("digits", strconv.Itoa(ma.Cells.Digits), strconv.Itoa(mb.Cells.Digits))
	case b.delim != a.delim:
		return differ("delimiter", tabular.DelimiterName(a.delim), tabular.DelimiterName(b.delim))
	case !slices.Equal(a.header, b.header):
		i := 0
		for i < len(a.header) && i < len(b.header) && a.header[i] == b.header[i] {
			i++
		}
		at := func(h []string) string {
			if i < len(h) {
				return strconv.Quote(h[i])
			}
			return "nothing"
		}
		return fmt.Errorf("%s:2: column header differs from %s's at column %d (%s, there %s): want the parts of one run", b.name, a.name, i+1, at(b.header), at(a.header))
	}
	return nil
}

// checkShards wants the parts' shards to be 0/N .. N-1/N, each once.
func checkShards(parts []*readPart) error {
	n := parts[0].meta.Shard.N
	if n < 1 {
		n = 1
	}
	seen := make(map[int]string, len(parts))
	for _, rp := range parts {
		sh := rp.meta.Shard
		if sh.N < 1 {
			sh = Shard{K: 0, N: 1}
		}
		if sh.N != n {
			return fmt.Errorf("%s:1: shard %s, but %s is shard %s: want the parts of one split (the same N)", rp.name, sh, parts[0].name, parts[0].meta.Shard)
		}
		if other, dup := seen[sh.K]; dup {
			return fmt.Errorf("%s:1: shard %s is also %s: give each part once", rp.name, sh, other)
		}
		seen[sh.K] = rp.name
	}
	for k := 0; k < n; k++ {
		if _, ok := seen[k]; !ok {
			return fmt.Errorf("shard %d/%d is missing: the %d parts given are %s; want all %d", k, n, len(parts), shardList(parts), n)
		}
	}
	return nil
}

func shardList(parts []*readPart) string {
	var s []string
	for _, rp := range parts {
		s = append(s, rp.meta.Shard.String()+" ("+rp.name+")")
	}
	return strings.Join(s, ", ")
}
