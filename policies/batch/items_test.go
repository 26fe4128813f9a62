package batch

import (
	"errors"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
)

func TestReadItemsErrors(t *testing.T) {
	const head = "sku,lead_time,holding_cost,shortage_cost,order_cost,unmet,policy,min_fill_rate,current_reorder_point,current_order_up_to,current_order_multiple\n"
	tests := []struct {
		row  string
		want string
	}{
		{"A,1,0.5,4,,,,,,,", ""},
		{"A,1,-3,4,,,,,,,", `items.csv:2: holding_cost "-3": want a finite cost >= 0`},
		{"A,1,abc,4,,,,,,,", `items.csv:2: holding_cost "abc": want a finite cost >= 0`},
		{"A,1,,4,,,,,,,", `items.csv:2: holding_cost "": want a finite cost >= 0`},
		{"A,1,1,NaN,,,,,,,", `items.csv:2: shortage_cost "NaN": want a finite cost >= 0`},
		{"A,1,1,2,inf,,,,,,", `items.csv:2: order_cost "inf": want a finite cost >= 0`},
		{"A,2.5,1,2,,,,,,,", `items.csv:2: lead_time "2.5": want a whole number of periods >= 0 (at most 1000000000), or a lead-time law such as pmf:2=0.2,3=0.5,5=0.3 or poisson:mean=4 (quoted where it holds commas)`},
		{"A,-1,1,2,,,,,,,", `items.csv:2: lead_time "-1": want a whole number of periods >= 0`},
		{"A,,1,2,,,,,,,", `items.csv:2: lead_time "": want a whole number of periods >= 0`},
		{"A,1,1,2,,sold,,,,,", `items.csv:2: unmet "sold": want backorder or lost`},
		{"A,1,1,2,,,(s;S),,,,", `items.csv:2: policy "(s;S)": want base-stock, s-S or s-nQ`},
		{"A,1,1,2,,,,1.5,,,", `items.csv:2: min_fill_rate "1.5": want a fraction in [0, 1) or a percentage below 100%`},
		{"A,1,1,2,,,,,x,,", `items.csv:2: current_reorder_point "x": want a whole number`},
		{"A,1,1,2,,,,,5,3,", `items.csv:2: current policy s-S(s=5,S=3): reorder point 5 must be below the order-up-to level 3`},
		{"A,1,1,2,,,,,5,,", `items.csv:2: current_reorder_point needs current_order_up_to (s-S) or current_order_multiple (s-nQ)`},
		{"A,1,1,2,,,,,,,4", `items.csv:2: current_order_multiple needs current_reorder_point`},
		{"A,1,1,2,,,,,,5,4", `items.csv:2: current_order_up_to and current_order_multiple: give one of them, not both`},
		{"A,1,1,2,,lost,,,-2,,3", `items.csv:2: current policy s-nQ(s=-2,Q=3): reorder point -2: want >= -1 in lost mode (inventory position never falls below 0)`},
		{",1,1,2,,,,,,,", `items.csv:2: sku "": want a non-empty SKU`},
		{"A,1,1,2", `items.csv:2: 4 fields, want 11 as in the header (sku "A")`},
		// One number rule: plain decimals only.
		{"A,1,1_000,4,,,,,,,", `items.csv:2: holding_cost "1_000": want a finite cost >= 0`},
		{"A,1,0x10,4,,,,,,,", `items.csv:2: holding_cost "0x10": want a finite cost >= 0`},
		{"A,1,1,Infinity,,,,,,,", `items.csv:2: shortage_cost "Infinity": want a finite cost >= 0`},
		{"A,1,1,1e400,,,,,,,", `items.csv:2: shortage_cost "1e400": want a finite cost >= 0`},
		{"A,1,1,2,0x1p4,,,,,,", `items.csv:2: order_cost "0x1p4": want a finite cost >= 0`},
		{"A,1,.5,2.5e1,1E2,,,,,,", ""},
		{"A,0x1,1,2,,,,,,,", `items.csv:2: lead_time "0x1": want a whole number of periods >= 0 (at most 1000000000), or a lead-time law such as pmf:2=0.2,3=0.5,5=0.3 or poisson:mean=4 (quoted where it holds commas)`},
		{"A,1_0,1,2,,,,,,,", `items.csv:2: lead_time "1_0": want a whole number of periods >= 0 (at most 1000000000), or a lead-time law such as pmf:2=0.2,3=0.5,5=0.3 or poisson:mean=4 (quoted where it holds commas)`},
		{"A,2.0,1,2,,,,,,,", ""},
		{"A,1e20,1,2,,,,,,,", `items.csv:2: lead_time "1e20": want a whole number of periods >= 0 below 9007199254740992 (2^53)`},
		{"A,1,1,2,,,,nan,,,", `items.csv:2: min_fill_rate "nan": want a fraction in [0, 1) or a percentage below 100%`},
		{"A,1,1,2,,,,.95,,,", ""},
		{"A,1,1,2,,,,,,1_000,", `items.csv:2: current_order_up_to "1_000": want a whole number`},
		{"A,1,1,2,,,,,,0x10,", `items.csv:2: current_order_up_to "0x10": want a whole number`},
		{"A,1,1,2,,,,,,9223372036854775807,", `items.csv:2: current_order_up_to "9223372036854775807": want a whole number below 9007199254740992 (2^53) in magnitude`},
		{"A,1,1,2,,,,,,1e3,", ""},
		{"A,1,1,2,,LOST,,,,,", ""},
		{"A,1,1,2,, Lost ,,,,,", ""},
		// Line breaks in a SKU break line-oriented joins of the results.
		{"\"A\nB\",1,1,2,,,,,,,", `items.csv:2: sku "A\nB": want a SKU without line breaks (CR or LF)`},
		{"\"A\rB\",1,1,2,,,,,,,", `items.csv:2: sku "A\rB": want a SKU without line breaks (CR or LF)`},
	}
	for _, tt := range tests {
		items := readItems(t, head+tt.row+"\n")
		if len(items) != 1 {
			t.Fatalf("%q: %d items, want 1", tt.row, len(items))
		}
		if got := errText(items[0].Err); got != tt.want {
			t.Errorf("%q:\n got %s\nwant %s", tt.row, got, tt.want)
		}
		var fe *inventory.FieldError
		if strings.Contains(tt.want, `": want`) && !errors.As(items[0].Err, &fe) {
			t.Errorf("%q: error %v does not wrap a *inventory.FieldError", tt.row, items[0].Err)
		}
	}
}

func TestReadItemsFields(t *testing.T) {
	// Any column order, any letter case, unknown columns ignored, a BOM.
	items := readItems(t, "\ufeffShortage_Cost, note ,SKU,holding_cost,lead_time,order_cost,unit_cost,unmet,policy,min_fill_rate,current_reorder_point,current_order_up_to,current_order_multiple\n"+
		"9,brake pads,BP-1,0.5,2,,,,,,,6,\n"+
		"\n"+
		"4,carbon strip,CS-2,1.5,0,20,3,lost,S-NQ,0.95,2,,5\n"+
		"4,door sensor,DS-3,1,1,10,,backorder,,,3,12,\n")
	if len(items) != 3 {
		t.Fatalf("%d items, want 3", len(items))
	}
	for _, it := range items {
		if it.Err != nil {
			t.Fatalf("%s: %v", it.SKU, it.Err)
		}
	}
	a, b, c := items[0], items[1], items[2]
	if a.SKU != "BP-1" || a.Index != 0 || a.Line != 2 || a.System.LeadTime != 2 || a.System.Holding != 0.5 ||
		a.System.Shortage != 9 || a.System.Mode != inventory.Backorder || a.Kind != "" ||
		*a.Current != (policies.Policy{Kind: policies.BaseStock, OrderUpTo: 6}) {
		t.Errorf("first item %+v, current %+v", a, a.Current)
	}
	if b.Index != 1 || b.Line != 4 || b.System.OrderCost != 20 || b.System.UnitCost != 3 || b.System.Mode != inventory.Lost ||
		b.Kind != policies.SNQ || b.MinFillRate != 0.95 ||
		*b.Current != (policies.Policy{Kind: policies.SNQ, ReorderPoint: 2, OrderMultiple: 5}) {
		t.Errorf("second item %+v, current %+v", b, b.Current)
	}
	if *c.Current != (policies.Policy{Kind: policies.SS, ReorderPoint: 3, OrderUpTo: 12}) {
		t.Errorf("third item current %+v", c.Current)
	}
}

func TestReadItemsWholeFile(t *testing.T) {
	tests := []struct {
		text string
		want string
	}{
		{"", "items.csv:1: empty file, want a header line with columns sku, lead_time, holding_cost, shortage_cost: missing column"},
		{"sku,lead_time,holding_cost\nA,1,2\n", `items.csv:1: missing column shortage_cost: the header (line 1) has "sku", "lead_time", "holding_cost"; name the column that holds it with --items-columns "shortage_cost=HEADER"`},
		{"\ufeffsku,lead_time,note\n", `items.csv:1: missing column holding_cost: the header (line 1) has "sku", "lead_time", "note"; name the column that holds it with --items-columns "holding_cost=HEADER"`},
		{"sku,holding_cost,shortage_cost\n", `items.csv:1: missing column lead_time or lead_time_days: the header (line 1) has "sku", "holding_cost", "shortage_cost"; name the column that holds it with --items-columns "lead_time=HEADER"`},
		{"sku,lead_time,holding_cost,shortage_cost,SKU\n", `items.csv:1: column "sku" appears 2 times in the header`},
		{"sku,lead_time,holding_cost,shortage_cost\nA,1,2,3\n\"B,1,2,3\n", `items.csv:3: extraneous or missing " in quoted-field (character 10): want a quoted field closed by " and each " inside it doubled`},
		{"sku,lead_time,holding_cost,shortage_cost\nA,1,2,3\nB,1,2\"x,3\n", `items.csv:3: bare " in non-quoted-field (character 6): want a field holding " enclosed in quotes, with the " doubled`},
		// A near miss of a known column is refused, naming both.
		{"sku,lead_time,holding_cost,shortage_cost,Order Csot\nA,1,2,3,4\n", `items.csv:1: column Order Csot: not a column ergostock reads, but close to order_cost: rename it order_cost, or map it with --items-columns "order_cost=Order Csot"`},
		// Costs in two currencies.
		{"sku,lead_time,holding_cost,shortage_cost\nA,1,€2,3\nB,1,$2,3\n", `items.csv:3: holding_cost "$2": costs in $, but line 2 (holding_cost) is in EUR: want one currency per file`},
	}
	for _, tt := range tests {
		_, err := ReadItems(strings.NewReader(tt.text), "items.csv", nil)
		if got := errText(err); got != tt.want {
			t.Errorf("%q:\n got %s\nwant %s", tt.text, got, tt.want)
		}
	}
	_, err := ReadItems(strings.NewReader("sku\n"), "items.csv", nil)
	if !errors.Is(err, ErrMissingColumn) {
		t.Errorf("error %v does not wrap ErrMissingColumn", err)
	}
}

func TestReadItemsDuplicates(t *testing.T) {
	text := "sku,lead_time,holding_cost,shortage_cost\nA,1,1,2\nB,1,1,2\nA,1,1,2\nA,0,1,2\n"
	want := []string{"", "", `items.csv:4: sku "A": want a SKU given once (it is first given on line 2)`,
		`items.csv:5: sku "A": want a SKU given once (it is first given on line 2)`}
	items := readItems(t, text)
	for i, it := range items {
		if got := errText(it.Err); got != want[i] {
			t.Errorf("item %d: got %s, want %s", i, got, want[i])
		}
	}
	// A shard that does not hold the first row still sees the duplicate.
	sh := Shard{K: 1, N: 2}
	items, err := ReadItems(strings.NewReader(text), "items.csv", sh.Contains)
	if err != nil {
		t.Fatal(err)
	}
	if len(items) != 2 || items[0].SKU != "B" || items[1].Index != 3 || errText(items[1].Err) != want[3] {
		t.Errorf("shard 1/2: %+v", items)
	}
}

// An empty SKU, or one with a line break, is an error of its item; the
// item stays in the list, so that result positions match the file.
func TestReadItemsKeepsBadSKUs(t *testing.T) {
	text := "sku,lead_time,holding_cost,shortage_cost\nA,1,1,2\n,1,1,2\n\"B\nC\",1,1,2\nD,1,1,2\n"
	items := readItems(t, text)
	want := []struct {
		index, line int
		sku, err    string
	}{
		{0, 2, "A", ""},
		{1, 3, "", `items.csv:3: sku "": want a non-empty SKU`},
		{2, 4, "B\nC", `items.csv:4: sku "B\nC": want a SKU without line breaks (CR or LF)`},
		{3, 6, "D", ""},
	}
	if len(items) != len(want) {
		t.Fatalf("%d items, want %d", len(items), len(want))
	}
	for i, w := range want {
		it := items[i]
		if it.Index != w.index || it.Line != w.line || it.SKU != w.sku || errText(it.Err) != w.err {
			t.Errorf("item %d: index %d, line %d, sku %q, error %v; want %+v", i, it.Index, it.Line, it.SKU, it.Err, w)
		}
	}
}

// parseNumber is the one number rule of the items file (plain decimals).
func TestParseNumber(t *testing.T) {
	for _, c := range []struct {
		s  string
		v  float64
		ok bool
	}{
		{"12", 12, true}, {"-3", -3, true}, {"+0.25", 0.25, true}, {".5", 0.5, true}, {"5.", 5, true},
		{"1e6", 1e6, true}, {"2.5E-3", 2.5e-3, true}, {"1e308", 1e308, true},
		{"", 0, false}, {".", 0, false}, {"-", 0, false}, {"1e", 0, false}, {"e1", 0, false}, {"1e+", 0, false},
		{"1_000", 0, false}, {"0x10", 0, false}, {"0x1p4", 0, false}, {"inf", 0, false}, {"+Inf", 0, false},
		{"Infinity", 0, false}, {"nan", 0, false}, {"NaN", 0, false}, {"1e400", 0, false}, {" 1", 0, false},
		{"1 ", 0, false}, {"1,5", 0, false}, {"1.2.3", 0, false}, {"--1", 0, false},
	} {
		v, err := parseNumber(c.s)
		if (err == nil) != c.ok || v != c.v {
			t.Errorf("parseNumber(%q) = %v, %v; want %v, ok %v", c.s, v, err, c.v, c.ok)
		}
	}
}
