package whatif

import (
	"encoding/json"
	"net/url"
	"reflect"
	"strings"
	"testing"
)

func TestArgsOf(t *testing.T) {
	for _, c := range []struct {
		command, body string
		want          []string
		err           string
	}{
		{"evaluate", `{"order_up_to":7,"demand":"poisson:mean=4","holding_cost":1e-3}`,
			[]string{"--demand=poisson:mean=4", "--holding-cost=1e-3", "--order-up-to=7"}, ""},
		{"evaluate", `{"reorder_point":-5,"order_multiple":"3","unit_cost":null}`,
			[]string{"--reorder-point=-5", "--order-multiple=3"}, ""},
		{"optimize", `{"min_fill_rate":0.95,"policy":"s-nQ"}`, []string{"--policy=s-nQ", "--min-fill-rate=0.95"}, ""},
		{"optimize", `{"order_up_to":7}`, nil, `optimize: unknown field "order_up_to"`},
		{"evaluate", `{"max_states":7}`, nil, `evaluate: unknown field "max_states"`},
		{"evaluate", `{"demand":true}`, nil, "demand: true: want a number or a string"},
		{"evaluate", `{"demand":{"a":1}}`, nil, `demand: {"a":1}: want a number or a string`},
		{"evaluate", `{"demand":"a\nb"}`, nil, "demand: want a value on one line"},
	} {
		var obj map[string]json.RawMessage
		if err := json.Unmarshal([]byte(c.body), &obj); err != nil {
			t.Fatal(err)
		}
		got, err := argsOf(c.command, obj)
		switch {
		case c.err != "" && (err == nil || !strings.HasPrefix(err.Error(), c.err)):
			t.Errorf("%s %s: error %v, want %q", c.command, c.body, err, c.err)
		case c.err == "" && (err != nil || !reflect.DeepEqual(got, c.want)):
			t.Errorf("%s %s: %q %v, want %q", c.command, c.body, got, err, c.want)
		}
	}
}

func TestArgsOfQuery(t *testing.T) {
	q, _ := url.ParseQuery("demand=poisson:mean%3D4&order_up_to=7&order_up_to=8")
	if _, err := argsOfQuery("evaluate", q); err == nil || !strings.Contains(err.Error(), "order_up_to: given 2 times") {
		t.Errorf("repeated parameter: %v", err)
	}
	q, _ = url.ParseQuery("demand=poisson:mean%3D4&order_up_to=7")
	got, err := argsOfQuery("evaluate", q)
	if want := []string{"--demand=poisson:mean=4", "--order-up-to=7"}; err != nil || !reflect.DeepEqual(got, want) {
		t.Errorf("%q %v, want %q", got, err, want)
	}
}

func TestKeyMessage(t *testing.T) {
	for _, c := range []struct{ command, in, want string }{
		{"evaluate", "--holding-cost -3: want a finite cost >= 0", "holding_cost -3: want a finite cost >= 0"},
		{"evaluate", "--lead-time-model sometimes: want sequential or independent", "lead_time_model sometimes: want sequential or independent"},
		{"evaluate", "--demand: required (see --help)", "demand: required (see --help)"},
		{"evaluate", "--max-states 5: raise --max-states", "--max-states 5: raise --max-states"},
		{"optimize", "--min-fill-rate 2: want a probability", "min_fill_rate 2: want a probability"},
		{"optimize", "--order-up-to and --order-multiple", "--order-up-to and --order-multiple"},
	} {
		if got := keyMessage(c.command, c.in); got != c.want {
			t.Errorf("keyMessage(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}

func TestReadRegret(t *testing.T) {
	for _, c := range []struct {
		name, in string
		has      bool
		want     []any
		err      string
	}{
		{"none", "# ergostock results v2\nsku,demand\nA,x\n", false, nil, ""},
		{"column", "# ergostock results v2\nsku,regret_p90\nA,1.5\nB,\n", true, []any{1.5, nil}, ""},
		{"bad", "sku,regret\nA,1.5\nB,lots\n", false, nil, `r.csv:3: regret "lots": want a finite number or an empty cell`},
		{"bad-after-meta", "# meta\nsku,regret\nB,NaN\n", false, nil, `r.csv:3: regret "NaN"`},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, has, err := ReadRegret(strings.NewReader(c.in), "r.csv")
			if c.err != "" {
				if err == nil || !strings.HasPrefix(err.Error(), c.err) {
					t.Errorf("error %v, want %q", err, c.err)
				}
				return
			}
			if err != nil || has != c.has || len(got) != len(c.want) {
				t.Fatalf("%v %v %v", got, has, err)
			}
			for i, w := range c.want {
				if w == nil && got[i] != nil || w != nil && (got[i] == nil || *got[i] != w.(float64)) {
					t.Errorf("row %d: %v, want %v", i, got[i], w)
				}
			}
		})
	}
}

func TestLocalHost(t *testing.T) {
	for host, want := range map[string]bool{
		"127.0.0.1:8080": true, "localhost:1": true, "[::1]:80": true, "LOCALHOST": true, "127.1.2.3": true,
		"example.com": false, "10.0.0.1:80": false, "localhost.evil.example:80": false, "": false,
	} {
		if got := localHost(host); got != want {
			t.Errorf("localHost(%q) = %v, want %v", host, got, want)
		}
	}
}
