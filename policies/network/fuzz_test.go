package network

import (
	"strings"
	"testing"

	"ergostock/inventory/tabular"
)

// FuzzReadNetwork: whatever the bytes, reading never panics, a refusal is
// one line naming the file, and an accepted network validates and, when
// its levels are modest, evaluates without error or panic.
func FuzzReadNetwork(f *testing.F) {
	for _, s := range []string{
		"location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock\nhub,,2,,0.5,,30\nshop,hub,1,poisson:mean=4,1,9,12\n",
		"location;parent;lead_time;demand;holding_cost;shortage_cost;base_stock\nhub;;0;;0,5;;3\na;hub;0;pmf:0=0.5,1=0.5;1;9;1\nb;hub;2;poisson:mean=1;1;9;-2\n",
		"location,parent,lead_time,demand,holding_cost,shortage_cost\nhub,,2,,0.5,\nshop,hub,x,poisson:mean=4,1,9\n",
		"sep=|\nlocation|parent|lead_time|demand|holding_cost|shortage_cost|base_stock\nhub||1||1||5\ns|hub|1|negbin:mean=2,var=5|1|9|4\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		n, err := Read(strings.NewReader(s), "n.csv", Echelon, tabular.Options{})
		if err != nil {
			if msg := err.Error(); strings.ContainsAny(msg, "\n\r") || !strings.HasPrefix(msg, "n.csv") {
				t.Fatalf("refusal %q: want one line starting with the file", msg)
			}
			return
		}
		if err := n.Validate(false); err != nil {
			t.Fatalf("accepted network does not validate: %v", err)
		}
		small := n.Centre.BaseStock >= -1000 && n.Centre.BaseStock <= 1000 && n.Centre.LeadTime <= 20 && len(n.Stores) <= 5
		for _, st := range n.Stores {
			small = small && st.BaseStock >= -1000 && st.BaseStock <= 1000 && st.LeadTime <= 20 && st.Demand.Mean() <= 50
		}
		if small && n.Centre.HasLevel {
			if _, err := Evaluate(n); err != nil && strings.ContainsAny(err.Error(), "\n\r") {
				t.Fatalf("evaluation error on two lines: %q", err)
			}
		}
	})
}
