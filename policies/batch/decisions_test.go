package batch

import (
	"bytes"
	"reflect"
	"strings"
	"testing"
	"time"

	"ergostock/inventory"
	"ergostock/policies"
)

func TestDecisionsRoundTrip(t *testing.T) {
	at := time.Date(2026, 12, 2, 15, 4, 5, 0, time.UTC)
	ds := []Decision{
		{SKU: "BRAKE-PAD-X", Version: 1, Kind: Accept, Policy: policies.Policy{Kind: policies.SS, ReorderPoint: -2, OrderUpTo: 20}, At: at},
		{SKU: "=HYPERLINK()", Version: 1, Kind: Keep, Policy: policies.Policy{Kind: policies.BaseStock, OrderUpTo: 7}, Note: "+1, \"quoted\"", At: at},
		{SKU: "BRAKE-PAD-X", Version: 2, Kind: Override, Policy: policies.Policy{Kind: policies.SNQ, ReorderPoint: 4, OrderMultiple: 12}, Note: "depot asked", At: at},
	}
	var buf bytes.Buffer
	if err := WriteDecisions(&buf, ds); err != nil {
		t.Fatal(err)
	}
	got, err := ReadDecisions(&buf, "d.csv")
	if err != nil {
		t.Fatal(err)
	}
	for i := range got {
		got[i].Line = 0
	}
	if !reflect.DeepEqual(got, ds) {
		t.Errorf("read back\n%+v\nwant\n%+v", got, ds)
	}
	if l := LatestDecisions(got)["BRAKE-PAD-X"]; l.Version != 2 {
		t.Errorf("latest %+v", l)
	}
}

func TestReadDecisionsRefusals(t *testing.T) {
	h := strings.Join(DecisionHeader(), ",") + "\n"
	for _, c := range []struct {
		name, in, want string
	}{
		{"header", "sku,what\n", "d.csv:1: header has 2 columns"},
		{"header-name", strings.Replace(h, "note", "comment", 1), `d.csv:1: column 8 is "comment"`},
		{"fields", h + "A,1,keep\n", "d.csv:2: 3 fields: want 9"},
		{"sku", h + ",1,keep,base-stock,,3,,,\n", "d.csv:2: sku"},
		{"version", h + "A,0,keep,base-stock,,3,,,\n", `d.csv:2: version "0"`},
		{"version-gap", h + "A,1,keep,base-stock,,3,,,\nA,3,keep,base-stock,,3,,,\n", `d.csv:3: version "3": want 2`},
		{"kind", h + "A,1,perhaps,base-stock,,3,,,\n", `d.csv:2: decision "perhaps"`},
		{"policy", h + "A,1,keep,min-max,,3,,,\n", `d.csv:2: policy "min-max"`},
		{"level-missing", h + "A,1,keep,s-S,,3,,,\n", `d.csv:2: reorder_point ""`},
		{"level-extra", h + "A,1,keep,base-stock,2,3,,,\n", `d.csv:2: reorder_point "2": want an empty cell`},
		{"level-bad", h + "A,1,keep,base-stock,,3.5,,,\n", `d.csv:2: order_up_to "3.5"`},
		{"time", h + "A,1,keep,base-stock,,3,,,noon\n", `d.csv:2: decided_at "noon"`},
		{"quote", h + "A,1,keep,base-stock,,3,,\"x,\n", "d.csv:2"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadDecisions(strings.NewReader(c.in), "d.csv")
			if err == nil || !strings.HasPrefix(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
				t.Errorf("error %v, want one line starting %q", err, c.want)
			}
		})
	}
	if ds, err := ReadDecisions(strings.NewReader(""), "d.csv"); err != nil || ds != nil {
		t.Errorf("empty file: %v %v", ds, err)
	}
}

func TestApplyDecisions(t *testing.T) {
	items := []Item{
		{SKU: "A", System: inventory.System{Mode: inventory.Backorder}},
		{SKU: "B", System: inventory.System{Mode: inventory.Lost}, Current: &policies.Policy{Kind: policies.BaseStock, OrderUpTo: 9}},
		{SKU: "C"},
	}
	ds := []Decision{
		{Line: 2, SKU: "A", Version: 1, Kind: Accept, Policy: policies.Policy{Kind: policies.SS, ReorderPoint: 3, OrderUpTo: 10}},
		{Line: 3, SKU: "A", Version: 2, Kind: Override, Policy: policies.Policy{Kind: policies.SS, ReorderPoint: -3, OrderUpTo: 12}},
		{Line: 4, SKU: "B", Version: 1, Kind: Override, Policy: policies.Policy{Kind: policies.SS, ReorderPoint: -3, OrderUpTo: 12}},
		{Line: 5, SKU: "Z", Version: 1, Kind: Keep, Policy: policies.Policy{Kind: policies.BaseStock, OrderUpTo: 1}},
	}
	n, unmatched := ApplyDecisions(items, ds, "d.csv")
	if n != 1 || !reflect.DeepEqual(unmatched, []string{"Z"}) {
		t.Errorf("applied %d, unmatched %v", n, unmatched)
	}
	if p := items[0].Current; p == nil || *p != ds[1].Policy {
		t.Errorf("A current %+v, want the override", p)
	}
	if items[1].Err == nil || !strings.HasPrefix(items[1].Err.Error(), "d.csv:4: policy s-S") {
		t.Errorf("B: %v, want the lost-mode refusal at d.csv:4", items[1].Err)
	}
	if items[2].Current != nil || items[2].Err != nil {
		t.Errorf("C touched: %+v", items[2])
	}
}

// A run by (sku, location) keeps its decisions with a location column:
// versions count per (sku, location), the latest decision of each pair is
// applied to its own item only, and a log that does not match the items'
// key is refused with its file and line.
func TestDecisionsByLocation(t *testing.T) {
	at := time.Date(2026, 12, 2, 15, 4, 5, 0, time.UTC)
	bs := func(S int) policies.Policy { return policies.Policy{Kind: policies.BaseStock, OrderUpTo: S} }
	ds := []Decision{
		{SKU: "A", Location: "north", Version: 1, Kind: Keep, Policy: bs(5), At: at},
		{SKU: "A", Location: "south", Version: 1, Kind: Override, Policy: bs(9), Note: "=x", At: at},
		{SKU: "A", Location: "north", Version: 2, Kind: Override, Policy: bs(6), At: at},
	}
	var buf bytes.Buffer
	if err := WriteDecisions(&buf, ds); err != nil {
		t.Fatal(err)
	}
	if h, _, _ := strings.Cut(buf.String(), "\n"); h != strings.Join(DecisionHeaderLocation(), ",") || !strings.HasPrefix(DecisionHeaderLocation()[1], "location") {
		t.Fatalf("header %q", h)
	}
	got, err := ReadDecisions(bytes.NewReader(buf.Bytes()), "d.csv")
	if err != nil {
		t.Fatal(err)
	}
	for i := range got {
		got[i].Line = 0
	}
	if !reflect.DeepEqual(got, ds) {
		t.Errorf("read back\n%+v\nwant\n%+v", got, ds)
	}
	items := []Item{{SKU: "A", Location: "north"}, {SKU: "A", Location: "south"}, {SKU: "A", Location: "east"}}
	if err := CheckDecisionsLocation(&DecisionLog{Decisions: got, Location: true}, true, "d.csv"); err != nil {
		t.Fatal(err)
	}
	n, unmatched := ApplyDecisions(items, append(got, Decision{SKU: "B", Location: "north", Version: 1, Kind: Keep, Policy: bs(1)}), "d.csv")
	if n != 2 || len(unmatched) != 1 || unmatched[0] != "B @ north" {
		t.Errorf("applied %d, unmatched %q", n, unmatched)
	}
	for i, want := range []int{6, 9, -1} {
		switch c := items[i].Current; {
		case want < 0 && c != nil, want >= 0 && (c == nil || c.OrderUpTo != want):
			t.Errorf("item %d (%s): current %+v, want order-up-to %d", i, items[i].Location, c, want)
		}
	}
	h := strings.Join(DecisionHeaderLocation(), ",") + "\n"
	// An empty location cell is the location "", as in an items file.
	if log, err := ReadDecisionLog(strings.NewReader(h+"A,,1,keep,base-stock,,3,,,\n"), "d.csv"); err != nil || !log.Location || log.Decisions[0].Key() != "A" || CheckDecisionsLocation(log, true, "d.csv") != nil {
		t.Errorf("empty location cell: %+v, %v", log, err)
	}
	for _, c := range []struct {
		name, in string
		byLoc    bool
		want     string
	}{
		{"fields", h + "A,north,1,keep\n", true, "d.csv:2: 4 fields: want 10"},
		{"version-per-pair", h + "A,north,1,keep,base-stock,,3,,,\nA,south,2,keep,base-stock,,3,,,\n", true, `d.csv:3: version "2": want 1, the next version of sku "A" at location "south"`},
		{"log-by-sku-run-by-location", strings.Join(DecisionHeader(), ",") + "\nA,1,keep,base-stock,,3,,,\n", true, `d.csv:2: sku "A": no location, but the items file plans by (sku, location)`},
		{"log-by-location-run-by-sku", h + "A,north,1,keep,base-stock,,3,,,\n", false, `d.csv:2: sku "A": location "north", but the items file has no location column`},
	} {
		t.Run(c.name, func(t *testing.T) {
			log, err := ReadDecisionLog(strings.NewReader(c.in), "d.csv")
			if err == nil {
				err = CheckDecisionsLocation(log, c.byLoc, "d.csv")
			}
			if err == nil || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
				t.Errorf("got %v, want one line containing %q", err, c.want)
			}
		})
	}
}
