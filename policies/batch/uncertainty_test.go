package batch

import (
	"bytes"
	"context"
	"encoding/csv"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"ergostock/inventory/history"
	"ergostock/policies"
	"ergostock/policies/uncertainty"
)

// uncItems and uncHistory are an invented catalogue of three parts; the
// third is planned from its demand column.
const uncItems = "sku,lead_time,holding_cost,shortage_cost,order_cost,min_fill_rate,demand\n" +
	"BRAKE-PAD,1,0.5,9,20,0.95,\n" +
	"WIPER-ARM,2,0.2,6,0,,\n" +
	"LAMP-LED,1,0.1,5,10,,poisson:mean=2\n"

func uncHistoryCSV() string {
	var b strings.Builder
	b.WriteString("sku,period,quantity\n")
	pads := []int{4, 2, 6, 3, 5, 1, 4, 7, 3, 2, 5, 4, 3, 6, 2, 4, 5, 3, 1, 6, 4, 3, 5, 2}
	arms := []int{0, 1, 0, 0, 2, 0, 1, 0, 0, 0, 3, 0, 1, 0, 0, 1, 0, 2, 0, 0, 1, 0, 0, 1}
	for i := range pads {
		b.WriteString("BRAKE-PAD," + strconv.Itoa(i+1) + "," + strconv.Itoa(pads[i]) + "\n")
		b.WriteString("WIPER-ARM," + strconv.Itoa(i+1) + "," + strconv.Itoa(arms[i]) + "\n")
		b.WriteString("LAMP-LED," + strconv.Itoa(i+1) + ",2\n")
	}
	return b.String()
}

// runUnc plans the catalogue with --uncertainty (robust or not) on the
// given workers and returns the results file.
func runUnc(t *testing.T, workers int, robust bool) string {
	t.Helper()
	items, err := ReadItems(strings.NewReader(uncItems), "items.csv", nil)
	if err != nil {
		t.Fatal(err)
	}
	h, err := history.Read(strings.NewReader(uncHistoryCSV()), "h.csv", history.Week)
	if err != nil {
		t.Fatal(err)
	}
	p := &Planner{}
	p.Fit, p.Pattern = HistoryFit(h, nil)
	p.Uncertainty = UncertaintyStep(uncertainty.Options{Resamples: 30, Seed: 5, Robust: robust}, policies.Options{})
	var out bytes.Buffer
	w := NewWriter(&out)
	w.Uncertainty = &robust
	if err := w.WriteHeader(); err != nil {
		t.Fatal(err)
	}
	err = p.PlanAll(context.Background(), items, RunOptions{Workers: workers}, func(r *Row) error {
		if r.Err != nil {
			t.Errorf("%s: %v", r.SKU, r.Err)
		}
		return w.Write(r)
	})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	return out.String()
}

func TestUncertaintyColumns(t *testing.T) {
	for _, robust := range []bool{false, true} {
		got := runUnc(t, 1, robust)
		recs, err := csv.NewReader(strings.NewReader(got)).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		want := append(Header(), UncertaintyHeader(robust)...)
		if !slices.Equal(recs[0], want) {
			t.Fatalf("header %v, want %v", recs[0], want)
		}
		col := func(name string) int { return slices.Index(want, name) }
		for _, rec := range recs[1:] {
			sku := rec[col("sku")]
			switch sku {
			case "LAMP-LED":
				if rec[col("regret_mean")] != "" || !strings.Contains(rec[col("warnings")], "demand column") {
					t.Errorf("%s: want empty uncertainty cells and a warning, got regret %q, warnings %q", sku, rec[col("regret_mean")], rec[col("warnings")])
				}
			default:
				if rec[col("resamples_used")] != "30" || rec[col("regret_p95")] == "" || rec[col("expected_fill_rate")] == "" {
					t.Errorf("%s: uncertainty cells %v", sku, rec[len(Header()):])
				}
				// base-stock (no order cost) has no reorder point band.
				if sku == "WIPER-ARM" && (rec[col("reorder_point_p05")] != "" || rec[col("order_up_to_p05")] == "") {
					t.Errorf("%s: base-stock bands %v", sku, rec[len(Header()):])
				}
				if robust && rec[col("robust_policy")] == "" {
					t.Errorf("%s: no robust policy", sku)
				}
			}
		}
	}
}

// TestUncertaintyAnyWorkers: the results are byte-identical for any
// worker count.
func TestUncertaintyAnyWorkers(t *testing.T) {
	one := runUnc(t, 1, true)
	if three := runUnc(t, 3, true); three != one {
		t.Errorf("workers 3 differ from workers 1:\n%s\n%s", one, three)
	}
}

func TestMetaUncertainty(t *testing.T) {
	m := Meta{Format: MetaFormat, Period: "week", Items: "a", History: "b", Shard: Shard{K: 0, N: 1}, Version: "v"}
	plain := m.RunDigest()
	if strings.Contains(m.String(), "uncertainty") {
		t.Error("a plain run's record names uncertainty")
	}
	m.Uncertainty = "iid,resamples=200,seed=1,robust=false"
	if m.RunDigest() == plain {
		t.Error("the run digest ignores the resampling")
	}
	back, err := ParseMeta(m.String(), "r.csv", 1)
	if err != nil || back.Uncertainty != m.Uncertainty {
		t.Errorf("ParseMeta: %v, %+v", err, back)
	}
}

// TestUncertaintyOutOfTime: an analysis that cannot finish in the item's
// budget costs its cells and leaves a warning; the plan stands.
func TestUncertaintyOutOfTime(t *testing.T) {
	items, err := ReadItems(strings.NewReader(uncItems), "items.csv", nil)
	if err != nil {
		t.Fatal(err)
	}
	h, err := history.Read(strings.NewReader(uncHistoryCSV()), "h.csv", history.Week)
	if err != nil {
		t.Fatal(err)
	}
	p := &Planner{}
	p.Fit, p.Pattern = HistoryFit(h, nil)
	p.Uncertainty = UncertaintyStep(uncertainty.Options{Resamples: uncertainty.MaxResamples}, policies.Options{})
	ctx, cancel := context.WithTimeout(context.Background(), 300*time.Millisecond)
	defer cancel()
	row := p.PlanContext(ctx, items[0])
	if row.Err != nil || row.Policy == nil {
		t.Fatalf("plan failed: %v", row.Err)
	}
	if row.Uncertainty != nil || !strings.Contains(strings.Join(row.Warnings, "; "), "time budget") {
		t.Errorf("cells %v, warnings %q", row.Uncertainty, row.Warnings)
	}
}
