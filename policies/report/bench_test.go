package report

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"ergostock/policies/batch"
	"ergostock/policies/internal/cputime"
)

// BenchmarkBatchPageDemo builds the batch page of the demo catalogue with
// the exchange curve at the default targets, from results read once
// (made by `ergostock batch` on the demo; the benchmark skips without
// them): go test -run '^$' -bench BatchPageDemo ./policies/report/
// with ERGOSTOCK_DEMO_RESULTS=path/to/results.csv.
func BenchmarkBatchPageDemo(b *testing.B) {
	path := os.Getenv("ERGOSTOCK_DEMO_RESULTS")
	if path == "" {
		b.Skip("set ERGOSTOCK_DEMO_RESULTS to a results file of the demo batch")
	}
	rf, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	res, err := ReadResultsFile(rf, path)
	rf.Close()
	if err != nil {
		b.Fatal(err)
	}
	f, err := os.Open("../../data/items.csv")
	if err != nil {
		b.Fatal(err)
	}
	items, err := batch.ReadItems(f, "items.csv", nil)
	f.Close()
	if err != nil {
		b.Fatal(err)
	}
	defer cputime.Report(b, cputime.Process())

	for b.Loop() {
		if _, err := BuildBatch(BatchInput{ResultsFile: path, Rows: res.Rows, ItemsFile: "items.csv", Items: items}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestExchangeDemoGolden compares the demo page's exchange curve with one
// recorded earlier, to 1e-12 relative: with ERGOSTOCK_DEMO_RESULTS set
// (see BenchmarkBatchPageDemo) and ERGOSTOCK_EXCHANGE_GOLDEN naming a file,
// it writes the file when it does not exist and compares otherwise. It is
// the check that the speed work on the exchange curve changed no figure.
func TestExchangeDemoGolden(t *testing.T) {
	path, golden := os.Getenv("ERGOSTOCK_DEMO_RESULTS"), os.Getenv("ERGOSTOCK_EXCHANGE_GOLDEN")
	if path == "" || golden == "" {
		t.Skip("set ERGOSTOCK_DEMO_RESULTS and ERGOSTOCK_EXCHANGE_GOLDEN")
	}
	rf, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	res, err := ReadResultsFile(rf, path)
	rf.Close()
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Open("../../data/items.csv")
	if err != nil {
		t.Fatal(err)
	}
	items, err := batch.ReadItems(f, "items.csv", nil)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	pg, err := BuildBatch(BatchInput{ResultsFile: path, Rows: res.Rows, ItemsFile: "items.csv", Items: items})
	if err != nil {
		t.Fatal(err)
	}
	var got []float64
	for _, p := range pg.Exchange.Points {
		got = append(got, p.FillRate, p.Investment)
	}
	got = append(got, float64(pg.Exchange.Items), float64(len(pg.Exchange.LeftOut)))
	b, err := os.ReadFile(golden)
	if os.IsNotExist(err) {
		out, _ := json.Marshal(got)
		if err := os.WriteFile(golden, out, 0o644); err != nil {
			t.Fatal(err)
		}
		t.Logf("wrote %s: %v", golden, got)
		return
	}
	if err != nil {
		t.Fatal(err)
	}
	var want []float64
	if err := json.Unmarshal(b, &want); err != nil {
		t.Fatal(err)
	}
	if len(want) != len(got) {
		t.Fatalf("got %d values, recorded %d", len(got), len(want))
	}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-12*max(1, math.Abs(want[i])) {
			t.Errorf("value %d: got %.17g, recorded %.17g", i, got[i], want[i])
		}
	}
	t.Logf("%d values equal to 1e-12 (searches run: %d)", len(got), pg.Exchange.Optimized)
}
