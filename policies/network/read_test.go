package network

import (
	"errors"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/inventory/tabular"
)

func TestReadDialects(t *testing.T) {
	for _, c := range []struct{ name, text string }{
		{"comma", "location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock\nhub,,2,,0.5,,30\nshop,hub,1,poisson:mean=4,1,9,12\n"},
		{"semicolon, decimal comma, loose names", "Location;Parent;Lead Time;Demand;Holding-Cost;Shortage Cost;Base Stock\nhub;;2;;0,5;;30\nshop;hub;1;poisson:mean=4;1;9;12\n"},
		{"quoted demand with commas, BOM, title line", "\ufeffnetwork of the west yard\nlocation,parent,lead_time,demand,holding_cost,shortage_cost,base_stock\nhub,,2,,0.5,,30\nshop,hub,1,\"negbin:mean=4,var=9\",1,9,12\n"},
	} {
		n, err := Read(strings.NewReader(c.text), "n.csv", Echelon, tabular.Options{})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if n.Centre.Name != "hub" || n.Centre.Holding != 0.5 || n.Centre.BaseStock != 30 || len(n.Stores) != 1 || n.Stores[0].BaseStock != 12 || n.Stores[0].Demand.Mean() != 4 {
			t.Errorf("%s: read %+v", c.name, n)
		}
	}
}

// Every refusal is one line naming the file, the line and the column.
func TestReadErrors(t *testing.T) {
	head := "location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock,min_fill_rate\n"
	for _, c := range []struct{ text, want string }{
		{head + "hub,,2,,0.5,,30,\nshop,hub,1.5,poisson:mean=4,1,9,12,\n", `n.csv:3: column lead_time: "1.5": want a whole number from 0 to 100000`},
		{head + "hub,,2,,0.5,,30,\nshop,hub,1,poisson:mean=-4,1,9,12,\n", "n.csv:3: column demand: demand"},
		{head + "hub,,2,,0.5,,30,\nshop,hub,1,poisson:mean=4,-1,9,12,\n", `n.csv:3: column holding_cost: "-1": want a finite cost >= 0`},
		{head + "hub,,2,,0.5,,30,\nshop,hub,1,poisson:mean=4,1,abc,12,\n", "n.csv:3: column shortage_cost:"},
		{head + "hub,,2,,0.5,,30,\nshop,hub,1,poisson:mean=4,1,9,12,1.2\n", `n.csv:3: column min_fill_rate: "1.2": want a fraction`},
		{head + "hub,,2,,0.5,,30,\nshop,yard,1,poisson:mean=4,1,9,12,\n", `n.csv:3: column parent: location "shop": "yard": want the centre "hub"`},
		{head + "hub,,2,,0.5,,30,\nyard,,2,,0.5,,30,\n", `n.csv:3: column parent: empty, as for "hub" (line 2): want exactly one centre`},
		{head + "hub,,2,,0.5,,30,\nshop,hub,1,poisson:mean=4,1,9,12,\nshop,hub,1,poisson:mean=4,1,9,12,\n", `n.csv:4: column location: location "shop": named twice (also line 3)`},
		{head + "hub,,2,poisson:mean=1,0.5,,30,\nshop,hub,1,poisson:mean=4,1,9,12,\n", `n.csv:2: column demand: location "hub"`},
		{head + "hub,,2,,0.5,,30,\nshop,hub,1,,1,9,12,\n", `n.csv:3: column demand: location "shop": empty`},
		{head + "hub,,2,,0.5,4,30,\nshop,hub,1,poisson:mean=4,1,9,12,\n", `n.csv:2: column shortage_cost: location "hub"`},
		{head + "hub,,2,,0.5,,30,\n", `n.csv:2: column parent: location "hub": no store`},
		{"location,parent,lead_time,demand,holding_cost,base_stock\nhub,,2,,0.5,30\n", "n.csv:1: missing column shortage_cost"},
		{"location,parent,lead_time,demand,holding_cost,shortage_cost,base_stok\nhub,,2,,0.5,,30\n", "n.csv:1: column base_stok: not a column ergostock reads, but close to base_stock"},
		{head + "hub,,2,,0.5,,30,\nshop,hub,1,poisson:mean=4,1,9,12,,extra\n", "n.csv:3: 9 fields, but the header (line 1) has 8"},
	} {
		_, err := Read(strings.NewReader(c.text), "n.csv", Echelon, tabular.Options{})
		if err == nil {
			t.Errorf("accepted, want %q", c.want)
			continue
		}
		if msg := err.Error(); !strings.HasPrefix(msg, c.want) || strings.Contains(msg, "\n") {
			t.Errorf("error %q, want it to start %q on one line", msg, c.want)
		}
	}
}

// An empty level is refused by Evaluate and accepted by Optimize.
func TestEmptyLevels(t *testing.T) {
	text := "location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock\nhub,,2,,0.5,,\nshop,hub,1,poisson:mean=4,1,9,\n"
	n, err := Read(strings.NewReader(text), "n.csv", Echelon, tabular.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Evaluate(n); err == nil || !strings.HasPrefix(err.Error(), `n.csv:2: column base_stock: location "hub": empty`) {
		t.Errorf("Evaluate: %v", err)
	}
	if _, err := Optimize(n); err != nil {
		t.Errorf("Optimize: %v", err)
	}
}

// Each SKU's rows form its network; a bad row fails its SKU alone.
func TestReadCatalogue(t *testing.T) {
	text := "sku;location;parent;lead_time;demand;holding_cost;shortage_cost;base_stock\n" +
		"A;hub;;2;;0,5;;\nA;shop;hub;1;poisson:mean=4;1;9;\n" +
		"B;hub;;2;;0,5;;\nB;shop;yard;1;poisson:mean=4;1;9;\n" +
		"C;hub;;2;;x;;\nA;kiosk;hub;0;poisson:mean=1;1;9;\n"
	items, err := ReadCatalogue(strings.NewReader(text), "c.csv", Echelon, tabular.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(items) != 3 || items[0].SKU != "A" || items[1].SKU != "B" || items[2].SKU != "C" {
		t.Fatalf("items %+v", items)
	}
	if items[0].Err != nil || len(items[0].Network.Stores) != 2 || items[0].Network.Centre.Holding != 0.5 {
		t.Errorf("A: %+v %v", items[0].Network, items[0].Err)
	}
	for i, want := range map[int]string{1: `c.csv:5: column parent: location "shop": "yard"`, 2: "c.csv:6: column holding_cost:"} {
		if items[i].Err == nil || !strings.HasPrefix(items[i].Err.Error(), want) {
			t.Errorf("%s: %v, want %q", items[i].SKU, items[i].Err, want)
		}
	}
}

// ReadCatalogueWith asks the demand source for every location whose demand
// cell is empty, and not for the others; the demand column is optional
// then, the column map and decimal comma apply, and an error of the source
// fails its SKU alone.
func TestReadCatalogueWithDemand(t *testing.T) {
	in := "Part;location;parent;lead_time;holding_cost;shortage_cost;demand\n" +
		"A;hub;;2;0,1;;\nA;east;hub;1;0,2;5;poisson:mean=2\nA;west;hub;1;0,2;5;\n" +
		"B;hub;;2;0,1;;\nB;north;hub;1;0,2;5;\n"
	var asked []string
	opt := CatalogueOptions{Columns: map[string]string{"sku": "Part"}, ColumnsFlag: "--items-columns",
		Demand: func(sku string, l Location) (inventory.Distribution, string, error) {
			asked = append(asked, sku+"/"+l.Name)
			switch {
			case l.Parent == "":
				return nil, "no demand at " + l.Name, nil
			case sku == "B":
				return nil, "", errors.New("items.csv:6: no history")
			}
			d, err := inventory.Parse("poisson:mean=3")
			return d, "fitted", err
		}}
	items, err := ReadCatalogueWith(strings.NewReader(in), "items.csv", Echelon, opt)
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(asked, ","); got != "A/hub,A/west,B/hub,B/north" {
		t.Errorf("asked %s", got)
	}
	if len(items) != 2 || items[0].Err != nil || items[1].Err == nil || !strings.Contains(items[1].Err.Error(), "no history") {
		t.Fatalf("items %+v", items)
	}
	n := items[0].Network
	if n.Centre.Holding != 0.1 || n.Stores[0].Demand.Mean() != 2 || n.Stores[1].Demand.Mean() != 3 {
		t.Errorf("network %+v", n)
	}
	if strings.Join(items[0].Notes, "|") != "no demand at hub|fitted" {
		t.Errorf("notes %q", items[0].Notes)
	}
	// Without a demand source the demand column stays required.
	noDemand := "sku,location,parent,lead_time,holding_cost,shortage_cost\nA,hub,,2,0.1,\n"
	if _, err := ReadCatalogue(strings.NewReader(noDemand), "items.csv", Echelon, tabular.Options{}); err == nil || !strings.Contains(err.Error(), "demand") {
		t.Errorf("no demand column, no source: %v", err)
	}
}
