package batch

import (
	"bytes"
	"context"
	"strings"
	"testing"
)

func TestCarry(t *testing.T) {
	const file = "sku,lead_time,holding_cost,shortage_cost,demand,Supplier Name,category\n" +
		"TRACK-BOLT-M24,1,0.5,9,pmf:2=1,Brackwater Foundry,=rails\n" +
		"DOOR-SEAL-3,1,-1,9,pmf:1=1,Valley Rubber,doors\n" + // fails, still carries
		"LAMP-H7,1,0.5,9,pmf:1=1,,lighting\n"
	for _, tt := range []struct {
		carry  string
		header []string
		cells  [][]string
		want   string // error
	}{
		{carry: "supplier_name, CATEGORY", header: []string{"Supplier Name", "category"},
			cells: [][]string{{"Brackwater Foundry", "=rails"}, {"Valley Rubber", "doors"}, {"", "lighting"}}},
		{carry: "category", header: []string{"category"}, cells: [][]string{{"=rails"}, {"doors"}, {"lighting"}}},
		{carry: "supplier", want: `--carry supplier: items.csv has no such column: its header has "sku", "lead_time", "holding_cost", "shortage_cost", "demand", "Supplier Name", "category"`},
		{carry: "demand", want: "--carry demand: the results have a column demand already"},
		{carry: "category,,sku", want: `--carry "category,,sku": want item column names separated by commas`},
		{carry: "category,Category", want: `--carry "category,Category": Category is named twice`},
	} {
		t.Run(tt.carry, func(t *testing.T) {
			items := readItems(t, file)
			names, err := ParseCarry(tt.carry)
			if err == nil {
				names, err = Carry(items, "items.csv", names)
			}
			if tt.want != "" {
				if err == nil || !strings.HasPrefix(err.Error(), tt.want) {
					t.Fatalf("err = %v, want %q", err, tt.want)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if strings.Join(names, "|") != strings.Join(tt.header, "|") {
				t.Errorf("names %q, want %q", names, tt.header)
			}
			for i, it := range items {
				if strings.Join(it.Carried, "|") != strings.Join(tt.cells[i], "|") {
					t.Errorf("item %d carries %q, want %q", i, it.Carried, tt.cells[i])
				}
			}
			// Through the plan to the results: appended last, guarded,
			// failed items included.
			var b bytes.Buffer
			w := NewWriter(&b)
			w.Carry(names)
			w.WriteHeader()
			pl := &Planner{Optimize: fakeOptimize, Evaluate: fakeEvaluate}
			if err := pl.PlanAll(context.Background(), items, RunOptions{Workers: 2}, w.Write); err != nil {
				t.Fatal(err)
			}
			w.Flush()
			lines := strings.Split(strings.TrimSpace(b.String()), "\n")
			if !strings.HasSuffix(lines[0], ",current_fill_rate,"+strings.Join(names, ",")) {
				t.Errorf("header %s", lines[0])
			}
			if tt.carry == "category" && (!strings.HasSuffix(lines[1], ",'=rails") || !strings.HasSuffix(lines[2], ",doors") || !strings.HasSuffix(lines[3], ",lighting")) {
				t.Errorf("rows:\n%s", b.String())
			}
		})
	}
}
