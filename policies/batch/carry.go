package batch

import (
	"fmt"
	"strings"

	"ergostock/inventory/tabular"
)

// RowCells is a row of the items file as read: the file's header (shared
// by every item of the file) and the row's cells, for the columns that
// Carry copies to the results.
type RowCells struct {
	Header []string
	Cells  []string
}

// rowCells keeps a row's cells (copied: the reader reuses its records)
// beside the file's header.
func rowCells(header, rec []string) RowCells {
	cells := make([]string, len(rec))
	for i, c := range rec {
		cells[i] = strings.Clone(strings.TrimSpace(c))
	}
	return RowCells{Header: header, Cells: cells}
}

// ParseCarry reads a --carry value: column names of the items file
// separated by commas, such as "supplier,category". It refuses an empty
// name and a name given twice.
func ParseCarry(s string) ([]string, error) {
	var names []string
	seen := map[string]bool{}
	for _, n := range strings.Split(s, ",") {
		n = strings.TrimSpace(n)
		if n == "" {
			return nil, fmt.Errorf("--carry %q: want item column names separated by commas, such as supplier,category", s)
		}
		if seen[tabular.Normalize(n)] {
			return nil, fmt.Errorf("--carry %q: %s is named twice", s, n)
		}
		seen[tabular.Normalize(n)] = true
		names = append(names, n)
	}
	return names, nil
}

// Carry finds the named columns in the items file's header (names compared
// as tabular.Normalize does: ignoring case, surrounding spaces and the
// difference between space, '_' and '-') and sets every item's Carried to
// its cells of those columns, in the order named ("" where a short row
// lacks one). It returns the column names as the header spells them, for
// the results header (appended after every results column, see
// Writer.Carry). It refuses a name the header lacks, naming the header
// found, and a name that is already a results column.
func Carry(items []Item, file string, names []string) ([]string, error) {
	if len(names) == 0 {
		return nil, nil
	}
	var header []string
	for _, it := range items {
		if it.Row.Header != nil {
			header = it.Row.Header
			break
		}
	}
	results := map[string]bool{}
	for _, h := range Header() {
		results[tabular.Normalize(h)] = true
	}
	pos := make([]int, len(names))
	spelt := make([]string, len(names))
	for i, n := range names {
		pos[i] = -1
		for j, h := range header {
			if tabular.Normalize(h) == tabular.Normalize(n) {
				pos[i], spelt[i] = j, strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))
				break
			}
		}
		if pos[i] < 0 {
			if header == nil {
				return nil, fmt.Errorf("--carry %s: %s has no items to carry it from", n, file)
			}
			return nil, fmt.Errorf("--carry %s: %s has no such column: its header has %s", n, file, quoteList(header))
		}
		if results[tabular.Normalize(spelt[i])] {
			return nil, fmt.Errorf("--carry %s: the results have a column %s already; rename the items column to carry it", n, tabular.Normalize(spelt[i]))
		}
	}
	for k := range items {
		vals := make([]string, len(names))
		for i, j := range pos {
			if j < len(items[k].Row.Cells) {
				vals[i] = items[k].Row.Cells[j]
			}
		}
		items[k].Carried = vals
	}
	return spelt, nil
}
