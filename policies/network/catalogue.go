package network

import (
	"errors"
	"fmt"
	"io"
	"strings"

	"ergostock/inventory/tabular"
)

// CatalogueItem is one SKU of a catalogue file: its network, or why it
// cannot be planned.
type CatalogueItem struct {
	SKU     string
	Line    int // the SKU's first line
	Network *Network
	Err     error // a one-line error naming file, line and column, or nil
}

// MaxCatalogueRows bounds the rows of a catalogue file.
const MaxCatalogueRows = 5_000_000

// ReadCatalogue reads an items file that plans one network per SKU: the
// columns of the network file plus sku; the rows of one SKU (in any order
// and anywhere in the file) are its locations. A row that cannot be read
// fails its SKU alone; a header that cannot be used fails the whole file.
// SKUs come back in the order of their first row.
func ReadCatalogue(r io.Reader, name string, levels Levels, opt tabular.Options) ([]CatalogueItem, error) {
	t, err := tabular.Open(r, name, opt)
	if err != nil {
		return nil, err
	}
	idx, err := tabular.Columns{Known: append([]string{"sku"}, Columns...), Required: append([]string{"sku"}, required...)}.Index(t)
	if err != nil {
		return nil, err
	}
	nums := &tabular.Numbers{File: name}
	type group struct {
		item CatalogueItem
		locs []Location
	}
	var order []string
	groups := map[string]*group{}
	rows := 0
	for {
		rec, line, err := t.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, err // a broken record: the lines after it cannot be trusted
		}
		if rows++; rows > MaxCatalogueRows {
			return nil, &tabular.Error{File: name, Line: line, Err: fmt.Errorf("more than %d rows: want a smaller file (split it by SKU)", MaxCatalogueRows)}
		}
		sku := strings.TrimSpace(rec[idx["sku"]])
		if sku == "" || strings.ContainsAny(sku, "\r\n") {
			return nil, &tabular.Error{File: name, Line: line, Column: "sku", Err: fmt.Errorf("%q: want a SKU on one line", sku)}
		}
		g := groups[sku]
		if g == nil {
			g = &group{item: CatalogueItem{SKU: sku, Line: line}}
			groups[sku] = g
			order = append(order, sku)
		}
		if g.item.Err != nil {
			continue
		}
		l, err := parseRow(name, rec, line, idx, nums)
		if err != nil {
			g.item.Err = err
			continue
		}
		g.locs = append(g.locs, l)
	}
	out := make([]CatalogueItem, 0, len(order))
	for _, sku := range order {
		g := groups[sku]
		if g.item.Err == nil {
			n, err := assemble(name, g.item.Line, g.locs, levels)
			g.item.Network, g.item.Err = n, err
		}
		out = append(out, g.item)
	}
	return out, nil
}
