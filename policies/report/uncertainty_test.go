package report

import (
	"bytes"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
	"ergostock/policies/batch"
	"ergostock/policies/uncertainty"
)

// TestSKUPageUncertainty: with an analysis, the page carries the level
// band chart and the fill-rate distribution, drawn, with their captions.
func TestSKUPageUncertainty(t *testing.T) {
	weeks := []int{3, 0, 5, 2, 4, 1, 6, 2, 3, 3, 0, 4, 2, 5, 1, 3, 7, 2, 4, 3}
	sys := inventory.System{LeadTime: 2, Holding: 0.4, Shortage: 9, OrderCost: 25, Mode: inventory.Backorder}
	res, err := uncertainty.Analyze("PANTO-CARBON", weeks, sys, uncertainty.Options{Resamples: 30, Seed: 2, Kind: policies.SS,
		Search: policies.SearchOptions{MinFillRate: 0.95}, Robust: true})
	if err != nil {
		t.Fatal(err)
	}
	sys.Demand = res.Demand
	pg, err := BuildSKU(SKUInput{SKU: "PANTO-CARBON", System: sys, Kind: policies.SS, MinFillRate: 0.95, Uncertainty: res})
	if err != nil {
		t.Fatal(err)
	}
	found := map[string]bool{}
	for _, c := range pg.Charts {
		if c.ID == "level-band" || c.ID == "fill-band" {
			if c.SVG == "" {
				t.Errorf("chart %s not drawn: %s", c.ID, c.Note)
			}
			found[c.ID] = true
		}
	}
	if !found["level-band"] || !found["fill-band"] {
		t.Fatalf("charts %v", found)
	}
	var b bytes.Buffer
	if err := pg.WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"resampled models", "Regret", "robust policy"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("page lacks %q", want)
		}
	}
}

// TestBatchPageRegret: a results file with the resampling columns gets the
// ranking by regret, largest 95th percentile first; one without them does
// not.
func TestBatchPageRegret(t *testing.T) {
	var buf bytes.Buffer
	w := batch.NewWriter(&buf)
	robust := false
	w.Uncertainty = &robust
	if err := w.WriteHeader(); err != nil {
		t.Fatal(err)
	}
	for i, c := range []struct {
		sku    string
		regret float64
	}{{"AXLE-BOX", 2}, {"HORN-UNIT", 9}, {"SEAT-COVER", 0.5}} {
		pol := policies.Policy{Kind: policies.SS, ReorderPoint: 4, OrderUpTo: 12}
		fig := inventory.Figures{FillRate: 0.96, TotalCost: 10}
		res := &uncertainty.Result{Scheme: uncertainty.IID, Used: 50, Point: &policies.Optimum{Evaluation: policies.Evaluation{Policy: pol}},
			ReorderPoint: uncertainty.Band{P05: 3, P50: 4, P95: 6}, FillRate: uncertainty.Spread{Mean: 0.94, P05: 0.88},
			Regret: uncertainty.Spread{Mean: c.regret / 3, P95: c.regret}}
		row := batch.Row{Item: i, SKU: c.sku, Demand: "poisson:mean=3", DemandMean: 3, DemandVariance: 3, Policy: &pol, Figures: &fig,
			Uncertainty: &batch.UncertaintyCells{Result: res}}
		if err := w.Write(&row); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	rows, err := ReadResults(bytes.NewReader(buf.Bytes()), "r.csv")
	if err != nil {
		t.Fatal(err)
	}
	got, _ := regretRows(rows)
	if len(got) != 3 || got[0].SKU != "HORN-UNIT" || got[1].SKU != "AXLE-BOX" || got[2].Band != "3 to 6" {
		t.Fatalf("ranking %+v", got)
	}
	pg, err := BuildBatch(BatchInput{ResultsFile: "r.csv", Rows: rows})
	if err != nil {
		t.Fatal(err)
	}
	var page bytes.Buffer
	if err := pg.WriteHTML(&page); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(page.String(), "items ranked by regret") {
		t.Error("the batch page has no regret ranking")
	}
	for i := range rows {
		rows[i].Uncertainty = nil
	}
	if r, _ := regretRows(rows); r != nil {
		t.Error("a ranking without resampling columns")
	}
}
