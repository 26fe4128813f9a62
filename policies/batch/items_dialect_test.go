package batch

import (
	"errors"
	"strings"
	"testing"

	"ergostock/inventory/history"
	"ergostock/inventory/tabular"
)

// Items from a spreadsheet: headers with spaces and capitals, decimal
// commas, percent fill rates, currency signs and codes, lead times in days
// (issue 11, items 2, 6 and 9).
func TestReadCatalogueSpreadsheetCells(t *testing.T) {
	const text = "\ufeffSKU;Lead Time Days;Holding Cost;Shortage Cost;Order Cost;Unit Cost;Min Fill Rate;Current Reorder Point;Current Order Up To\r\n" +
		"A;14;€0,25;12,50 EUR;€ 40;1.234,50 €;98,5 %;3;12\r\n" +
		"B;10;0,5;9;;;95%;;\r\n"
	c, err := ReadCatalogue(strings.NewReader(text), "items.csv", nil, ReadOptions{PeriodDays: 7, PeriodName: "week"})
	if err != nil {
		t.Fatal(err)
	}
	a, b := c.Items[0], c.Items[1]
	if a.Err != nil || b.Err != nil {
		t.Fatalf("errors %v, %v", a.Err, b.Err)
	}
	s := a.System
	if s.LeadTime != 2 || s.Holding != 0.25 || s.Shortage != 12.5 || s.OrderCost != 40 || s.UnitCost != 1234.5 || a.MinFillRate != 0.985 {
		t.Errorf("A: %+v, fill rate %v", s, a.MinFillRate)
	}
	if a.Current == nil || a.Current.ReorderPoint != 3 || a.Current.OrderUpTo != 12 || len(a.Warnings) != 0 {
		t.Errorf("A: current %v, warnings %q", a.Current, a.Warnings)
	}
	if b.System.LeadTime != 2 || b.MinFillRate != 0.95 || len(b.Warnings) != 1 || b.Warnings[0] != "lead_time_days 10 is 1.43 weeks: rounded up to 2 (a whole number of periods)" {
		t.Errorf("B: lead time %d, fill rate %v, warnings %q", b.System.LeadTime, b.MinFillRate, b.Warnings)
	}
	if c.Currency != "EUR" || !strings.Contains(c.Dialect, "';'-delimited, UTF-8 with BOM, decimal comma") || !strings.Contains(c.Dialect, "costs in EUR") {
		t.Errorf("currency %q, dialect %q", c.Currency, c.Dialect)
	}
}

// "Order Cost" is order_cost: an optional header with a space is never
// ignored (issue 11, item 9: order cost 0 changed 153 items' policies).
func TestReadCatalogueLooseNames(t *testing.T) {
	for _, h := range []string{"Order Cost", "ORDER-COST", " order_cost "} {
		items, err := ReadItems(strings.NewReader("sku,lead_time,holding_cost,shortage_cost,"+h+"\nA,1,1,9,40\n"), "items.csv", nil)
		if err != nil || items[0].System.OrderCost != 40 {
			t.Errorf("%q: %v, order cost %v", h, err, items)
		}
	}
	m, err := tabular.ParseColumnMap("--items-columns", "sku=Item No,holding_cost=Carrying Cost", ItemColumns())
	if err != nil {
		t.Fatal(err)
	}
	c, err := ReadCatalogue(strings.NewReader("Item No,lead_time,Carrying Cost,shortage_cost\nA,1,0.5,9\n"), "items.csv", nil, ReadOptions{Columns: m})
	if err != nil || c.Items[0].SKU != "A" || c.Items[0].System.Holding != 0.5 {
		t.Errorf("mapped: %v, %+v", err, c)
	}
	_, err = ReadItems(strings.NewReader("sku;lead_time;holding_cost;shortage_cost\nA;1;1;9\n"), "items.csv", nil)
	if err != nil {
		t.Errorf("semicolons: %v", err)
	}
	_, err = ReadCatalogue(strings.NewReader("sku;lead_time;holding_cost;shortage_cost\nA;1;1;9\n"), "items.csv", nil, ReadOptions{Table: tabular.Options{Delimiter: ','}})
	if want := `items.csv:1: missing column sku: the header (line 1) has "sku;lead_time;holding_cost;shortage_cost"; the header looks ';'-delimited, but the file was read as ','-delimited: give --delimiter ';'`; errText(err) != want || !errors.Is(err, ErrMissingColumn) {
		t.Errorf("forced comma:\n got %v\nwant %s", err, want)
	}
}

// A row whose field count differs from the header is an error of its own
// item with the line; an unquoted decimal comma in a comma file is one.
func TestReadCatalogueFieldCount(t *testing.T) {
	items := readItems(t, "sku,lead_time,holding_cost,shortage_cost\nA,1,0,5,9\nB,1,1,9\n")
	if got := errText(items[0].Err); got != `items.csv:2: 5 fields, want 4 as in the header (sku "A")` || items[1].Err != nil {
		t.Errorf("errors %q, %v", got, items[1].Err)
	}
}

// Locations: the planning key is (sku, location); a SKU may appear once
// per location; items without history get near-match hints.
func TestReadCatalogueLocations(t *testing.T) {
	c, err := ReadCatalogue(strings.NewReader("sku,location,lead_time,holding_cost,shortage_cost\nA,north,1,1,9\nA,south,1,1,9\nA,north,1,1,9\n"), "items.csv", nil, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !c.ByLocation || c.Items[1].Key() != "A\x00south" || c.Items[0].Err != nil ||
		errText(c.Items[2].Err) != `items.csv:4: sku "A": want a SKU given once per location (location "north") (it is first given on line 2)` {
		t.Errorf("%+v", c.Items)
	}
	h, err := history.Read(strings.NewReader("sku,date,quantity\n00123,2026-01-05,3\nBolt-M8 ,2026-01-05,2\n"), "h.csv", history.Week)
	if err != nil {
		t.Fatal(err)
	}
	fit, _ := HistoryFit(h, nil)
	for sku, want := range map[string]string{
		"123":     `no history for sku "123" in h.csv; did you mean "00123"?`,
		"bolt-m8": `no history for sku "bolt-m8" in h.csv; did you mean "Bolt-M8"?`,
		"NUT":     `no history for sku "NUT" in h.csv`,
	} {
		if _, err := fit(sku); errText(err) != want {
			t.Errorf("%s: %v, want %s", sku, err, want)
		}
	}
}
