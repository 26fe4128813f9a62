package network

import (
	"errors"
	"fmt"
	"io"
	"strings"

	"ergostock/inventory"
	"ergostock/inventory/tabular"
)

// CatalogueItem is one SKU of a catalogue file: its network, or why it
// cannot be planned.
type CatalogueItem struct {
	SKU     string
	Line    int // the SKU's first line
	Network *Network
	Err     error // a one-line error naming file, line and column, or nil
	// Notes are what the reader assumed for this SKU (one line each):
	// a centre without demand, a demand fitted from the history.
	Notes []string
}

// CatalogueOptions change how ReadCatalogueWith reads a catalogue. The
// zero value reads as ReadCatalogue.
type CatalogueOptions struct {
	// Table fixes the delimiter, the encoding or the sheet of a workbook.
	Table tabular.Options
	// Decimal is the decimal mark of the numbers, '.' or ','; 0 finds it.
	Decimal byte
	// Columns maps the reader's column names (sku and Columns) to the
	// file's headers; ColumnsFlag names the option that gave it.
	Columns     map[string]string
	ColumnsFlag string
	// Demand, when not nil, gives the external demand of a location whose
	// demand cell is empty (or of every location when the file has no
	// demand column, which is then optional): a law, or nil for none (a
	// centre with no demand of its own), and a note for CatalogueItem.Notes
	// (""  for none). An error fails the SKU alone; it should name where
	// the demand was looked for. l is the location as read (Name, Parent, Line).
	Demand func(sku string, l Location) (d inventory.Distribution, note string, err error)
}

// MaxCatalogueRows bounds the rows of a catalogue file.
const MaxCatalogueRows = 5_000_000

// ReadCatalogue reads an items file that plans one network per SKU: the
// columns of the network file plus sku; the rows of one SKU (in any order
// and anywhere in the file) are its locations. A row that cannot be read
// fails its SKU alone; a header that cannot be used fails the whole file.
// SKUs come back in the order of their first row.
func ReadCatalogue(r io.Reader, name string, levels Levels, opt tabular.Options) ([]CatalogueItem, error) {
	return ReadCatalogueWith(r, name, levels, CatalogueOptions{Table: opt})
}

// CatalogueColumns are the columns a catalogue file may have: sku and
// those of the network file.
func CatalogueColumns() []string { return append([]string{"sku"}, Columns...) }

// ReadCatalogueWith reads a catalogue as ReadCatalogue does, with the
// dialect, column map and demand source of opt.
func ReadCatalogueWith(r io.Reader, name string, levels Levels, opt CatalogueOptions) ([]CatalogueItem, error) {
	t, err := tabular.Open(r, name, opt.Table)
	if err != nil {
		return nil, err
	}
	req := []string{"sku"}
	for _, k := range required {
		if k != "demand" || opt.Demand == nil {
			req = append(req, k)
		}
	}
	idx, err := tabular.Columns{Known: CatalogueColumns(), Required: req, Map: opt.Columns, MapFlag: opt.ColumnsFlag}.Index(t)
	if err != nil {
		return nil, err
	}
	nums := &tabular.Numbers{File: name, Decimal: opt.Decimal}
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
		if err == nil && l.Demand == nil && opt.Demand != nil {
			var note string
			l.Demand, note, err = opt.Demand(sku, l)
			if note != "" {
				g.item.Notes = append(g.item.Notes, note)
			}
		}
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
