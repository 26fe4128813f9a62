package report

import (
	"bytes"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
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
