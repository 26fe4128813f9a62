package report

import (
	"bytes"
	"strings"
	"testing"

	"ergostock/inventory/tabular"
	"ergostock/policies/network"
)

func TestNetworkPage(t *testing.T) {
	file := `location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock,min_fill_rate
central-stores,,5,,0.20,,40,
harrow-lane,central-stores,1,poisson:mean=3.2,0.32,18,9,0.97
<millbeck>,central-stores,2,poisson:mean=2.1,0.32,18,9,0.97
`
	n, err := network.Read(strings.NewReader(file), "n.csv", network.Echelon, tabular.Options{})
	if err != nil {
		t.Fatal(err)
	}
	plan, err := network.Optimize(n)
	if err != nil {
		t.Fatal(err)
	}
	alone, err := network.Alone(n)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := WriteNetworkPage(&b, NetworkInput{Plan: plan, Alone: alone, Check: "measured"}); err != nil {
		t.Fatal(err)
	}
	page := b.String()
	for _, want := range []string{"<svg", "Planned as a network", "Each location planned alone", "&lt;millbeck&gt;", "harrow-lane", "an approximation", "Assumptions and cautions"} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	for _, bad := range []string{"<millbeck>", "<script", "http://", "https://"} {
		if bad == "http://" {
			// the SVG namespace is the one URL allowed
			page = strings.ReplaceAll(page, `xmlns="http://www.w3.org/2000/svg"`, "")
		}
		if strings.Contains(page, bad) {
			t.Errorf("page holds %q", bad)
		}
	}
}
