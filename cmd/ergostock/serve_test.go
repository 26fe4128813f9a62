package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"math"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"ergostock/cmd/ergostock/whatif"
	"ergostock/policies/batch"
)

// serveItems are three parts of the invented demo catalogue (data/): a
// lost-sales s-S item, an s-nQ item and a backorder item with a demand
// column.
const serveItems = `sku,lead_time,holding_cost,shortage_cost,order_cost,unit_cost,unmet,policy,min_fill_rate,demand,current_reorder_point,current_order_up_to,current_order_multiple
WIPE-CAB-100,2,0.0218,6.87,62.43,4.54,lost,,,,38,88,
GLOVE-NITRILE-S,1,0.0343,6.82,67.16,7.13,,s-nQ,,,28,,25
BRAKE-PAD-X,2,0.5,9,20,3,backorder,s-S,0.95,poisson:mean=3,4,20,
`

// serveFixture runs a batch over serveItems and the demo history and
// returns the paths of the files serve reads.
func serveFixture(t testing.TB) (dir, items, hist, results string) {
	t.Helper()
	dir = t.TempDir()
	items = filepath.Join(dir, "items.csv")
	if err := os.WriteFile(items, []byte(serveItems), 0o644); err != nil {
		t.Fatal(err)
	}
	hist = filepath.Join("..", "..", "data", "history.csv")
	results = filepath.Join(dir, "results.csv")
	var stderr bytes.Buffer
	if code := run([]string{"ergostock", "batch", "--items", items, "--history", hist, "--out", results, "--workers", "1"}, nil, &bytes.Buffer{}, &stderr); code != 0 {
		t.Fatalf("batch exit %d: %s", code, stderr.String())
	}
	return dir, items, hist, results
}

// newServeHandler builds the server of serve over the fixture.
func newServeHandler(t testing.TB) (*whatif.Server, string, string) {
	t.Helper()
	dir, items, hist, results := serveFixture(t)
	cfg, err := serveConfig(context.Background(), results, items, hist, "")
	if err != nil {
		t.Fatal(err)
	}
	srv, err := whatif.New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	srv.EvaluateCurrent(context.Background(), 1)
	return srv, dir, cfg.Decisions
}

func post(t testing.TB, h http.Handler, path, body string) *httptest.ResponseRecorder {
	t.Helper()
	req := httptest.NewRequest("POST", "http://127.0.0.1"+path, strings.NewReader(body))
	req.Header.Set("Content-Type", "application/json")
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, req)
	return rec
}

// argsFromJSON turns a request into flags as a planner would type them.
func argsFromJSON(t *testing.T, body string) []string {
	t.Helper()
	var obj map[string]any
	dec := json.NewDecoder(strings.NewReader(body))
	dec.UseNumber()
	if err := dec.Decode(&obj); err != nil {
		t.Fatal(err)
	}
	var args []string
	for k, v := range obj {
		var s string
		switch v := v.(type) {
		case string:
			s = v
		case json.Number:
			s = v.String()
		}
		args = append(args, "--"+strings.ReplaceAll(k, "_", "-"), s)
	}
	return args
}

// TestServeMatchesCommandLine: the API's answers are what evaluate --json
// and optimize --json print, byte for byte.
func TestServeMatchesCommandLine(t *testing.T) {
	srv, _, _ := newServeHandler(t)
	cases := []struct{ command, body string }{
		{"evaluate", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9,"order_up_to":7}`},
		{"evaluate", `{"demand":"negbin:mean=4,var=9","lead_time":2,"holding_cost":"0.5","shortage_cost":9,"order_cost":20,"reorder_point":3,"order_up_to":15}`},
		{"evaluate", `{"demand":"poisson:mean=3","lead_time":"pmf:1=0.5,2=0.5","holding_cost":0.5,"shortage_cost":9,"reorder_point":-2,"order_multiple":6}`},
		{"evaluate", `{"demand":"poisson:mean=2","lead_time":1,"holding_cost":1,"shortage_cost":5,"unmet":"lost","reorder_point":2,"order_up_to":8}`},
		{"evaluate", `{"demand":"poisson:mean=2","holding_cost":1,"shortage_cost":5,"review_period":2,"order_up_to":8,"unit_cost":null}`},
		{"optimize", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9,"order_cost":30}`},
		{"optimize", `{"demand":"poisson:mean=4","lead_time":1,"holding_cost":1,"shortage_cost":9,"policy":"base-stock","min_fill_rate":0.99}`},
		{"optimize", `{"demand":"poisson:mean=2","lead_time":1,"holding_cost":1,"shortage_cost":5,"unmet":"lost","policy":"s-S","order_cost":10}`},
	}
	for _, c := range cases {
		t.Run(c.command+c.body, func(t *testing.T) {
			rec := post(t, srv, "/api/"+c.command, c.body)
			var want, stderr bytes.Buffer
			args := append([]string{"ergostock", c.command}, argsFromJSON(t, strings.Replace(c.body, `,"unit_cost":null`, "", 1))...)
			if code := run(append(args, "--json"), nil, &want, &stderr); code != 0 {
				t.Fatalf("command line exit %d: %s", code, stderr.String())
			}
			if rec.Code != 200 {
				t.Fatalf("status %d: %s", rec.Code, rec.Body.String())
			}
			if !bytes.Equal(rec.Body.Bytes(), want.Bytes()) {
				t.Errorf("answer differs from the command line:\n got %s\nwant %s", rec.Body.String(), want.String())
			}
		})
	}
}

var flagWord = regexp.MustCompile(`--([a-z][a-z-]*[a-z])`)

// TestServeRefusals: a refused request gets a 4xx and the command line's
// message, with the flags named by their request names.
func TestServeRefusals(t *testing.T) {
	srv, _, _ := newServeHandler(t)
	cases := []struct {
		path, body string
		status     int
		cli        bool   // the message is the command line's for the same flags
		want       string // a part of the message, when not
	}{
		{"/api/evaluate", `{"demand":"poisson:mean=4","holding_cost":-1,"shortage_cost":9,"order_up_to":7}`, 400, true, "holding_cost -1: want"},
		{"/api/evaluate", `{"demand":"poison:mean=4","holding_cost":1,"shortage_cost":9,"order_up_to":7}`, 400, true, "demand"},
		{"/api/evaluate", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9}`, 400, true, "no policy"},
		{"/api/evaluate", `{"demand":"poisson:mean=4","holding_cost":1,"order_up_to":7}`, 400, true, "shortage_cost: required"},
		{"/api/evaluate", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9,"reorder_point":9,"order_up_to":7}`, 400, true, "reorder point 9"},
		{"/api/evaluate", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9,"order_up_to":"7.5"}`, 400, true, "order_up_to 7.5: want a whole number"},
		{"/api/evaluate", `{"demand":"poisson:mean=4","holding_cost":"1e999","shortage_cost":9,"order_up_to":7}`, 400, true, "holding_cost 1e999"},
		{"/api/evaluate", `{"demand":"poisson:mean=4","lead_time":"pmf:1=0.9,5=0.1","holding_cost":1,"shortage_cost":9,"order_up_to":7}`, 400, true, "lead_time"},
		{"/api/evaluate", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9,"reorder_point":0,"order_up_to":900000000}`, 422, true, "order_up_to 900000000: the inventory-position chain"},
		{"/api/optimize", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9,"min_fill_rate":1.5}`, 400, true, "min_fill_rate 1.5: want a probability"},
		{"/api/optimize", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9,"policy":"min-max"}`, 400, true, "policy min-max"},
		{"/api/evaluate", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9,"order_up_to":7,"colour":"red"}`, 400, false, `evaluate: unknown field "colour"`},
		{"/api/optimize", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9,"order_up_to":7}`, 400, false, `optimize: unknown field "order_up_to"`},
		{"/api/evaluate", `{"demand":"poisson:mean=4","holding_cost":[1],"shortage_cost":9,"order_up_to":7}`, 400, false, "holding_cost: [1]: want a number or a string"},
		{"/api/evaluate", `[1,2]`, 400, false, "want one JSON object"},
		{"/api/evaluate", `{"demand":"poisson:mean=4"} {}`, 400, false, "nothing after it"},
		{"/api/evaluate", ``, 400, false, "empty request body"},
		{"/api/evaluate", `{"demand":"poisson:mean=4\n","holding_cost":1,"shortage_cost":9,"order_up_to":7}`, 400, false, "want a value on one line"},
		{"/api/decisions", `{"sku":"NOPE","decision":"accept","version":0}`, 400, false, `sku "NOPE": want a SKU of the results file`},
		{"/api/decisions", `{"sku":"BRAKE-PAD-X","decision":"maybe","version":0}`, 400, false, `decision "maybe": want accept, keep or override`},
		{"/api/decisions", `{"sku":"BRAKE-PAD-X","decision":"accept"}`, 400, false, "version: want the version"},
		{"/api/decisions", `{"sku":"BRAKE-PAD-X","decision":"override","version":0,"reorder_point":9,"order_up_to":7}`, 400, false, "decision: policy: reorder point 9 must be below"},
		{"/api/decisions", `{"sku":"BRAKE-PAD-X","decision":"override","version":0,"order_up_to":"x"}`, 400, false, "order_up_to \"x\": want a whole number"},
	}
	for _, c := range cases {
		t.Run(c.body, func(t *testing.T) {
			rec := post(t, srv, c.path, c.body)
			var got struct{ Error string }
			if err := json.Unmarshal(rec.Body.Bytes(), &got); err != nil {
				t.Fatalf("answer not JSON: %q", rec.Body.String())
			}
			if rec.Code != c.status {
				t.Errorf("status %d, want %d (%s)", rec.Code, c.status, got.Error)
			}
			if got.Error == "" || strings.ContainsAny(got.Error, "\n\r") {
				t.Errorf("message %q: want one non-empty line", got.Error)
			}
			if !strings.Contains(got.Error, c.want) {
				t.Errorf("message %q: want it to contain %q", got.Error, c.want)
			}
			if c.cli {
				command := strings.TrimPrefix(c.path, "/api/")
				var stderr bytes.Buffer
				args := append([]string{"ergostock", command}, argsFromJSON(t, c.body)...)
				if code := run(append(args, "--json"), nil, &bytes.Buffer{}, &stderr); code == 0 {
					t.Fatalf("command line accepted it")
				}
				want := strings.TrimPrefix(strings.TrimSpace(stderr.String()), "ergostock: ")
				want = flagWord.ReplaceAllStringFunc(want, func(m string) string {
					if m == "--help" || m == "--max-states" {
						return m // not request names
					}
					return strings.ReplaceAll(m[2:], "-", "_")
				})
				if got.Error != want {
					t.Errorf("message differs from the command line's:\n got %s\nwant %s", got.Error, want)
				}
			}
		})
	}
}

// TestServeGuards: body size, content type, host, method, unknown item.
func TestServeGuards(t *testing.T) {
	srv, _, _ := newServeHandler(t)
	big := `{"demand":"` + strings.Repeat("x", 70<<10) + `"}`
	if rec := post(t, srv, "/api/evaluate", big); rec.Code != http.StatusRequestEntityTooLarge || !strings.Contains(rec.Body.String(), "too large") {
		t.Errorf("large body: %d %s", rec.Code, rec.Body.String())
	}
	req := httptest.NewRequest("POST", "http://127.0.0.1/api/evaluate", strings.NewReader(`{}`))
	req.Header.Set("Content-Type", "text/plain")
	rec := httptest.NewRecorder()
	srv.ServeHTTP(rec, req)
	if rec.Code != http.StatusUnsupportedMediaType {
		t.Errorf("text/plain: %d %s", rec.Code, rec.Body.String())
	}
	req = httptest.NewRequest("GET", "http://evil.example/api/items", nil)
	rec = httptest.NewRecorder()
	srv.ServeHTTP(rec, req)
	if rec.Code != http.StatusForbidden {
		t.Errorf("foreign host: %d %s", rec.Code, rec.Body.String())
	}
	for _, c := range []struct {
		path string
		code int
	}{{"/api/items", 200}, {"/api/items/BRAKE-PAD-X", 200}, {"/api/items/NOPE", 404}, {"/", 200}, {"/page.js", 200},
		{"/api/levels?demand=poisson:mean%3D4&holding_cost=1&shortage_cost=9&order_up_to=7", 200},
		{"/api/levels?demand=poisson:mean%3D4&holding_cost=1&shortage_cost=9", 400}, {"/api/decisions", 200}, {"/api/nothing", 404}, {"/api/evaluate", 405}} {
		req := httptest.NewRequest("GET", "http://localhost:8080"+c.path, nil)
		rec := httptest.NewRecorder()
		srv.ServeHTTP(rec, req)
		if rec.Code != c.code {
			t.Errorf("GET %s: %d, want %d: %.200s", c.path, rec.Code, c.code, rec.Body.String())
		}
	}
}

// TestServeLevels: the stock-level law sums to 1 and gives the on-hand
// and stockout figures of evaluate.
func TestServeLevels(t *testing.T) {
	srv, _, _ := newServeHandler(t)
	q := "demand=poisson:mean%3D4&lead_time=1&holding_cost=1&shortage_cost=9&reorder_point=5&order_up_to=14"
	rec := httptest.NewRecorder()
	srv.ServeHTTP(rec, httptest.NewRequest("GET", "http://127.0.0.1/api/levels?"+q, nil))
	var l struct {
		Of           string
		Min          int
		P            []float64
		Below, Above float64
		Evaluation   map[string]any
	}
	if err := json.Unmarshal(rec.Body.Bytes(), &l); err != nil || rec.Code != 200 {
		t.Fatalf("%d %s", rec.Code, rec.Body.String())
	}
	e := post(t, srv, "/api/evaluate", `{"demand":"poisson:mean=4","lead_time":1,"holding_cost":1,"shortage_cost":9,"reorder_point":5,"order_up_to":14}`)
	var f struct{ MeanOnHand, StockoutProbability float64 }
	var raw map[string]any
	json.Unmarshal(e.Body.Bytes(), &raw)
	if !reflect.DeepEqual(raw, l.Evaluation) {
		t.Errorf("levels' evaluation differs from POST /api/evaluate:\n%v\n%v", l.Evaluation, raw)
	}
	f.MeanOnHand, f.StockoutProbability = raw["mean_on_hand"].(float64), raw["stockout_probability"].(float64)
	sum, onHand, short := l.Below+l.Above, 0.0, 0.0
	for i, p := range l.P {
		k := l.Min + i
		sum += p
		if k > 0 {
			onHand += float64(k) * p
		}
		if k < 0 {
			short += p
		}
	}
	if math.Abs(sum-1) > 1e-12 || math.Abs(onHand-f.MeanOnHand) > 1e-9 || math.Abs(short-f.StockoutProbability) > 1e-11 {
		t.Errorf("levels: sum %v, on hand %v (evaluate %v), P(NI<0) %v (evaluate %v)", sum, onHand, f.MeanOnHand, short, f.StockoutProbability)
	}
}

// panicEngine fails every run with a panic.
type panicEngine struct{}

func (panicEngine) Run(context.Context, string, []string, bool) (*whatif.Answer, error) {
	panic("engine broke")
}

// TestServeRecovers: a panic answers 500 and the server goes on.
func TestServeRecovers(t *testing.T) {
	srv0, _, _ := newServeHandler(t)
	_ = srv0
	dir, items, hist, results := serveFixture(t)
	cfg, err := serveConfig(context.Background(), results, items, hist, filepath.Join(dir, "d.csv"))
	if err != nil {
		t.Fatal(err)
	}
	cfg.Engine = panicEngine{}
	srv, err := whatif.New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 2; i++ {
		rec := post(t, srv, "/api/evaluate", `{"demand":"poisson:mean=4","holding_cost":1,"shortage_cost":9,"order_up_to":7}`)
		if rec.Code != 500 || !strings.Contains(rec.Body.String(), "engine broke") {
			t.Errorf("panic: %d %s", rec.Code, rec.Body.String())
		}
	}
}

// TestServeDecisions: decisions are versioned, a stale one gets 409 and
// nothing is lost, and batch --decisions takes them as the policies in
// use.
func TestServeDecisions(t *testing.T) {
	srv, dir, path := newServeHandler(t)
	steps := []struct {
		body   string
		status int
		want   string
	}{
		{`{"sku":"BRAKE-PAD-X","decision":"accept","version":0}`, 200, `"version":1`},
		{`{"sku":"BRAKE-PAD-X","decision":"keep","version":0,"note":"second tab"}`, 409, "based on version 0, but version 1 was recorded"},
		{`{"sku":"BRAKE-PAD-X","decision":"override","version":1,"note":"supplier, asked for 2 per week","reorder_point":6,"order_up_to":22}`, 200, `"version":2`},
		{`{"sku":"GLOVE-NITRILE-S","decision":"keep","version":0}`, 200, `"version":1`},
		{`{"sku":"WIPE-CAB-100","decision":"override","version":0,"note":"=cmd()","order_up_to":90}`, 200, `"type":"base-stock"`},
		{`{"sku":"WIPE-CAB-100","decision":"override","version":0,"order_up_to":95}`, 409, "nothing was saved"},
	}
	for _, s := range steps {
		rec := post(t, srv, "/api/decisions", s.body)
		if rec.Code != s.status || !strings.Contains(rec.Body.String(), s.want) {
			t.Errorf("%s: %d %s, want %d and %q", s.body, rec.Code, rec.Body.String(), s.status, s.want)
		}
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	ds, err := batch.ReadDecisions(f, path)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	if len(ds) != 4 {
		t.Fatalf("%d decisions in the file, want 4: %+v", len(ds), ds)
	}
	if d := ds[1]; d.SKU != "BRAKE-PAD-X" || d.Version != 2 || d.Kind != batch.Override || d.Policy.ReorderPoint != 6 || d.Policy.OrderUpTo != 22 || d.Note != "supplier, asked for 2 per week" {
		t.Errorf("override read back as %+v", d)
	}
	if d := ds[3]; d.Note != "=cmd()" {
		t.Errorf("note read back as %q", d.Note)
	}
	// A second server on the same file sees the decisions.
	cfg, err := serveConfig(context.Background(), filepath.Join(dir, "results.csv"), filepath.Join(dir, "items.csv"), filepath.Join("..", "..", "data", "history.csv"), "")
	if err != nil {
		t.Fatal(err)
	}
	srv2, err := whatif.New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	if rec := post(t, srv2, "/api/decisions", `{"sku":"BRAKE-PAD-X","decision":"accept","version":1}`); rec.Code != 409 {
		t.Errorf("second server, stale: %d %s", rec.Code, rec.Body.String())
	}

	// batch --decisions: the override's levels are the policy in use.
	out := filepath.Join(dir, "again.csv")
	var stderr bytes.Buffer
	code := run([]string{"ergostock", "batch", "--items", filepath.Join(dir, "items.csv"), "--history", filepath.Join("..", "..", "data", "history.csv"),
		"--out", out, "--workers", "1", "--decisions", path}, nil, &bytes.Buffer{}, &stderr)
	if code != 0 {
		t.Fatalf("batch --decisions: exit %d: %s", code, stderr.String())
	}
	if !strings.Contains(stderr.String(), "3 items take their latest decision") {
		t.Errorf("batch said %q", stderr.String())
	}
	// The decisions shape current_total_cost and saving: the header record
	// names their digest, and the run digest differs from a run without them.
	head, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	first, _, _ := strings.Cut(string(head), "\n")
	meta, err := batch.ParseMeta(first, out, 1)
	if err != nil {
		t.Fatal(err)
	}
	if meta.Decisions == "" || meta.RunDigest() != meta.Run {
		t.Errorf("header record %q: want decisions= and a run digest that takes it in", first)
	}
	plain := *meta
	plain.Decisions = ""
	if plain.RunDigest() == meta.Run {
		t.Errorf("the run digest ignores the decisions file: %q", first)
	}
	cur := currentCosts(t, out)
	var want bytes.Buffer
	if code := run([]string{"ergostock", "evaluate", "--demand", "poisson:mean=3", "--lead-time", "2", "--holding-cost", "0.5",
		"--shortage-cost", "9", "--order-cost", "20", "--unit-cost", "3", "--reorder-point", "6", "--order-up-to", "22", "--json"}, nil, &want, &stderr); code != 0 {
		t.Fatal(stderr.String())
	}
	var e struct {
		TotalCost float64 `json:"total_cost"`
	}
	json.Unmarshal(want.Bytes(), &e)
	if got := cur["BRAKE-PAD-X"]; math.Abs(got-e.TotalCost) > 1e-9*math.Abs(e.TotalCost) {
		t.Errorf("BRAKE-PAD-X current_total_cost %v, want the override's %v", got, e.TotalCost)
	}
}

// currentCosts reads the current_total_cost column of a results file.
func currentCosts(t *testing.T, path string) map[string]float64 {
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitN(string(b), "\n", 2)
	recs, err := csv.NewReader(strings.NewReader(lines[1])).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	m := map[string]float64{}
	for _, r := range recs[1:] {
		v, _ := strconv.ParseFloat(r[col["current_total_cost"]], 64)
		m[r[col["sku"]]] = v
	}
	return m
}

// TestServeConcurrentDecisions: decisions from many requests at once are
// all kept (each SKU's versions count up without a gap).
func TestServeConcurrentDecisions(t *testing.T) {
	srv, _, path := newServeHandler(t)
	var wg sync.WaitGroup
	for i := 0; i < 8; i++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for v := 0; v < 20; v++ {
				rec := post(t, srv, "/api/decisions", `{"sku":"GLOVE-NITRILE-S","decision":"keep","version":`+strconv.Itoa(v)+`}`)
				if rec.Code == 200 {
					continue
				}
				if rec.Code != 409 {
					t.Errorf("%d %s", rec.Code, rec.Body.String())
				}
			}
		}()
	}
	wg.Wait()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	ds, err := batch.ReadDecisions(f, path)
	if err != nil {
		t.Fatal(err)
	}
	if len(ds) == 0 || ds[len(ds)-1].Version != len(ds) {
		t.Errorf("%d decisions, last version %d", len(ds), ds[len(ds)-1].Version)
	}
}

// BenchmarkServeEvaluate10k times POST /api/evaluate (the handler, the
// command's flag parsing and the exact evaluation) and GET /api/levels on
// an s-S chain of 10,000 states, and POST /api/evaluate on a lost-sales
// chain of 9,591 states: what the page asks for at each change.
func BenchmarkServeEvaluate10k(b *testing.B) {
	srv, _, _ := newServeHandler(b)
	body := `{"demand":"poisson:mean=40","lead_time":2,"holding_cost":1,"shortage_cost":20,"order_cost":50,"reorder_point":100,"order_up_to":10100}`
	rec := post(b, srv, "/api/evaluate", body)
	if rec.Code != 200 || !strings.Contains(rec.Body.String(), `"states": 10000`) {
		b.Fatalf("%d %.300s", rec.Code, rec.Body.String())
	}
	b.Run("evaluate", func(b *testing.B) {
		for b.Loop() {
			if rec := post(b, srv, "/api/evaluate", body); rec.Code != 200 {
				b.Fatal(rec.Body.String())
			}
		}
	})
	lost := `{"demand":"poisson:mean=47","lead_time":2,"unmet":"lost","holding_cost":1,"shortage_cost":20,"order_up_to":140}`
	b.Run("evaluate-lost", func(b *testing.B) { // 9,591 states of on-hand and pipeline
		for b.Loop() {
			if rec := post(b, srv, "/api/evaluate", lost); rec.Code != 200 {
				b.Fatal(rec.Body.String())
			}
		}
	})
	b.Run("levels", func(b *testing.B) {
		q := "/api/levels?demand=poisson:mean%3D40&lead_time=2&holding_cost=1&shortage_cost=20&order_cost=50&reorder_point=100&order_up_to=10100"
		for b.Loop() {
			rec := httptest.NewRecorder()
			srv.ServeHTTP(rec, httptest.NewRequest("GET", "http://127.0.0.1"+q, nil))
			if rec.Code != 200 {
				b.Fatal(rec.Body.String())
			}
		}
	})
}

// TestServeTimeout: an evaluation past the server's budget is stopped
// and answered 503; the server goes on.
func TestServeTimeout(t *testing.T) {
	dir, items, hist, results := serveFixture(t)
	cfg, err := serveConfig(context.Background(), results, items, hist, filepath.Join(dir, "d.csv"))
	if err != nil {
		t.Fatal(err)
	}
	cfg.Timeout = time.Millisecond
	srv, err := whatif.New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	// A lost-sales chain of about 40,000 states: far more than 1 ms.
	rec := post(t, srv, "/api/evaluate", `{"demand":"poisson:mean=15","lead_time":3,"unmet":"lost","holding_cost":1,"shortage_cost":20,"order_up_to":60}`)
	if rec.Code != http.StatusServiceUnavailable || !strings.Contains(rec.Body.String(), "evaluate: stopped after 1ms") {
		t.Errorf("%d %s", rec.Code, rec.Body.String())
	}
}

// TestServeRegret: a regret column in the results reaches the list.
func TestServeRegret(t *testing.T) {
	dir, items, hist, results := serveFixture(t)
	b, err := os.ReadFile(results)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSuffix(string(b), "\n"), "\n")
	for i := 1; i < len(lines); i++ {
		switch {
		case i == 1:
			lines[i] += ",regret"
		case strings.HasPrefix(lines[i], "GLOVE-NITRILE-S,"):
			lines[i] += ",2.5"
		default:
			lines[i] += ","
		}
	}
	withRegret := filepath.Join(dir, "regret.csv")
	if err := os.WriteFile(withRegret, []byte(strings.Join(lines, "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	cfg, err := serveConfig(context.Background(), withRegret, items, hist, "")
	if err != nil {
		t.Fatal(err)
	}
	srv, err := whatif.New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	rec := httptest.NewRecorder()
	srv.ServeHTTP(rec, httptest.NewRequest("GET", "http://127.0.0.1/api/items", nil))
	var got struct {
		Uncertainty bool
		Items       []struct {
			SKU    string
			Regret *float64
		}
	}
	if err := json.Unmarshal(rec.Body.Bytes(), &got); err != nil {
		t.Fatal(err)
	}
	if !got.Uncertainty {
		t.Errorf("uncertainty not shown")
	}
	for _, it := range got.Items {
		if (it.SKU == "GLOVE-NITRILE-S") != (it.Regret != nil) || it.Regret != nil && *it.Regret != 2.5 {
			t.Errorf("%s: regret %v", it.SKU, it.Regret)
		}
	}
	if d := cfg.Decisions; filepath.Base(d) != "regret-decisions.csv" {
		t.Errorf("default decisions file %s", d)
	}
}

// TestServeSignal runs the built binary: it listens on a free loopback
// port, records a decision, and on SIGINT stops with status 0, the
// decision in the file.
func TestServeSignal(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary")
	}
	bin := buildBinary(t)
	dir, items, hist, results := serveFixture(t)
	decisions := filepath.Join(dir, "d.csv")
	cmd := exec.Command(bin, "serve", "--results", results, "--items", items, "--history", hist,
		"--addr", "127.0.0.1:0", "--decisions", decisions)
	stderr, err := cmd.StderrPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	t.Cleanup(func() {
		if cmd.ProcessState == nil {
			cmd.Process.Kill()
			<-done
		}
	})
	lines := make(chan string, 16)
	go func() {
		sc := bufio.NewScanner(stderr)
		for sc.Scan() {
			lines <- sc.Text()
		}
		close(lines)
		done <- cmd.Wait()
	}()
	var addr string
	timeout := time.After(60 * time.Second)
	for addr == "" {
		select {
		case l, ok := <-lines:
			if !ok {
				t.Fatal("serve ended before listening")
			}
			if i := strings.Index(l, "http://"); i >= 0 {
				addr = strings.SplitN(l[i+len("http://"):], "/", 2)[0]
			}
		case <-timeout:
			t.Fatal("serve did not listen within 60 s")
		}
	}
	resp, err := http.Post("http://"+addr+"/api/decisions", "application/json",
		strings.NewReader(`{"sku":"GLOVE-NITRILE-S","decision":"keep","version":0,"note":"packs of 25 stay"}`))
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != 200 {
		t.Fatalf("decision: status %d", resp.StatusCode)
	}
	if err := cmd.Process.Signal(os.Interrupt); err != nil {
		t.Fatal(err)
	}
	var rest []string
	for l := range lines {
		rest = append(rest, l)
	}
	if err := <-done; err != nil {
		t.Errorf("serve after SIGINT: %v (%s)", err, strings.Join(rest, " | "))
	}
	if !strings.Contains(strings.Join(rest, "\n"), "stopped; decisions in") {
		t.Errorf("stderr after SIGINT: %q", rest)
	}
	b, err := os.ReadFile(decisions)
	if err != nil || !strings.Contains(string(b), "GLOVE-NITRILE-S,1,keep,s-nQ,28,,25,packs of 25 stay,") {
		t.Errorf("decisions file: %q %v", b, err)
	}
}

// checkInputs: for every item, the inputs the page starts from with the
// recommended levels give the recommended figures of the results, so the
// page shows the item as the batch planned it.
func checkInputs(t *testing.T, srv http.Handler) {
	t.Helper()
	rec := httptest.NewRecorder()
	srv.ServeHTTP(rec, httptest.NewRequest("GET", "http://127.0.0.1/api/items", nil))
	var list struct{ Items []struct{ SKU string } }
	if err := json.Unmarshal(rec.Body.Bytes(), &list); err != nil || len(list.Items) == 0 {
		t.Fatalf("items: %v %s", err, rec.Body.String())
	}
	for _, it := range list.Items {
		rec := httptest.NewRecorder()
		srv.ServeHTTP(rec, httptest.NewRequest("GET", "http://127.0.0.1/api/items/"+it.SKU, nil))
		var d struct {
			Inputs             map[string]string
			Recommended        map[string]any
			RecommendedFigures map[string]float64 `json:"recommended_figures"`
			Error              string
		}
		if err := json.Unmarshal(rec.Body.Bytes(), &d); err != nil {
			t.Fatal(err)
		}
		if d.Error != "" {
			continue
		}
		req := map[string]any{}
		for k, v := range d.Inputs {
			if k != "policy" && k != "min_fill_rate" {
				req[k] = v
			}
		}
		for k, v := range d.Recommended {
			if k != "type" {
				req[k] = v
			}
		}
		body, _ := json.Marshal(req)
		e := post(t, srv, "/api/evaluate", string(body))
		var got map[string]any
		if err := json.Unmarshal(e.Body.Bytes(), &got); err != nil || e.Code != 200 {
			t.Fatalf("%s: %d %s", it.SKU, e.Code, e.Body.String())
		}
		for k, w := range d.RecommendedFigures {
			if g := got[k].(float64); math.Abs(g-w) > 1e-9*math.Max(1, math.Abs(w)) {
				t.Errorf("%s: %s %v from the inputs, %v in the results", it.SKU, k, g, w)
			}
		}
	}
}

func TestServeInputsReproduceResults(t *testing.T) {
	srv, _, _ := newServeHandler(t)
	checkInputs(t, srv)
}

// TestServeReceiptsTiming: an item planned with a lead-time law from
// receipts starts from that law, not the items file's whole number.
func TestServeReceiptsTiming(t *testing.T) {
	dir := t.TempDir()
	items := filepath.Join(dir, "items.csv")
	const row = "GLOVE-NITRILE-M,2,0.0356,2.68,100.08,7.4,,s-nQ,,,87,,10\n"
	if err := os.WriteFile(items, []byte(strings.SplitN(serveItems, "\n", 2)[0]+"\n"+row), 0o644); err != nil {
		t.Fatal(err)
	}
	hist := filepath.Join("..", "..", "data", "history.csv")
	results := filepath.Join(dir, "results.csv")
	var stderr bytes.Buffer
	if code := run([]string{"ergostock", "batch", "--items", items, "--history", hist, "--receipts", filepath.Join("..", "..", "data", "receipts.csv"),
		"--out", results, "--workers", "1"}, nil, &bytes.Buffer{}, &stderr); code != 0 {
		t.Fatalf("batch exit %d: %s", code, stderr.String())
	}
	cfg, err := serveConfig(context.Background(), results, items, hist, "")
	if err != nil {
		t.Fatal(err)
	}
	srv, err := whatif.New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	rec := httptest.NewRecorder()
	srv.ServeHTTP(rec, httptest.NewRequest("GET", "http://127.0.0.1/api/items/GLOVE-NITRILE-M", nil))
	var d struct{ Inputs map[string]string }
	json.Unmarshal(rec.Body.Bytes(), &d)
	if !strings.Contains(d.Inputs["lead_time"], ":") {
		t.Errorf("lead_time input %q, want the law from the receipts", d.Inputs["lead_time"])
	}
	checkInputs(t, srv)
}
