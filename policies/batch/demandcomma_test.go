package batch

import (
	"strings"
	"testing"
)

// A demand written with decimal commas (what a spreadsheet in a
// decimal-comma locale writes) is read where the grammar leaves no doubt
// and refused, with a one-line message asking for a decimal point, where
// it does (see demandcomma.go).
func TestDemandDecimalComma(t *testing.T) {
	for _, c := range []struct {
		name, text string
		opt        ReadOptions
		want, err  string // the demand as read back, or the error
	}{
		{"comma file", "sku;lead_time;holding_cost;shortage_cost;demand\nA;1;0,5;9;poisson:mean=2,5\n", ReadOptions{}, "poisson:mean=2.5", ""},
		{"two parameters", "sku;lead_time;holding_cost;shortage_cost;demand\nA;1;0,5;9;negbin:mean=2,5,var=9,75\n", ReadOptions{}, "negbin:mean=2.5,var=9.75", ""},
		{"pmf", "sku;lead_time;holding_cost;shortage_cost;demand\nA;1;0,5;9;pmf:0=0,25,1=0,75\n", ReadOptions{}, "pmf:0=0.25,1=0.75", ""},
		{"no comma needed", "sku;lead_time;holding_cost;shortage_cost;demand\nA;1;0,5;9;negbin:mean=2,var=9\n", ReadOptions{}, "negbin:mean=2,var=9", ""},
		{"given comma, three digits", "sku;lead_time;holding_cost;shortage_cost;demand\nA;1;1;9;poisson:mean=1,500\n", ReadOptions{Decimal: ','}, "poisson:mean=1.5", ""},
		{"mark unknown, one digit", "sku;lead_time;holding_cost;shortage_cost;demand\nA;1;1;9;poisson:mean=2,5\n", ReadOptions{}, "poisson:mean=2.5", ""},
		{"mark unknown, three digits", "sku;lead_time;holding_cost;shortage_cost;demand\nA;1;1;9;poisson:mean=1,500\n", ReadOptions{}, "",
			`items.csv:2: demand "poisson:mean=1,500": want the demand with a decimal point (e.g. poisson:mean=1.500): 1,500 may be a decimal comma or digit grouping`},
		{"point file", "sku;lead_time;holding_cost;shortage_cost;demand\nA;1;0.5;9;poisson:mean=2,5\n", ReadOptions{}, "",
			`items.csv:2: demand "poisson:mean=2,5": want the demand with a decimal point (e.g. poisson:mean=2.5): the file's numbers use a decimal point`},
		{"comma-delimited file", "sku,lead_time,holding_cost,shortage_cost,demand\nA,1,1,9,\"poisson:mean=2,5\"\n", ReadOptions{}, "",
			`items.csv:2: demand "poisson:mean=2,5": want the demand with a decimal point`},
		{"grouped value", "sku;lead_time;holding_cost;shortage_cost;demand\nA;1;0,5;9;poisson:mean=1.200,5\n", ReadOptions{}, "",
			`items.csv:2: demand "poisson:mean=1.200,5": want the demand with a decimal point: "5" is not a parameter`},
	} {
		t.Run(c.name, func(t *testing.T) {
			cat, err := ReadCatalogue(strings.NewReader(c.text), "items.csv", nil, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			it := cat.Items[0]
			switch {
			case c.err != "":
				if it.Err == nil || !strings.HasPrefix(it.Err.Error(), c.err) || strings.Contains(it.Err.Error(), "\n") {
					t.Errorf("error %v, want one line starting %q", it.Err, c.err)
				}
			case it.Err != nil:
				t.Errorf("error %v, want demand %s", it.Err, c.want)
			case it.System.Demand == nil || it.System.Demand.String() != c.want:
				t.Errorf("demand %v, want %s", it.System.Demand, c.want)
			}
		})
	}
}
