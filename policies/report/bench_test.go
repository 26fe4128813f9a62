package report

import (
	"os"
	"testing"

	"ergostock/policies/batch"
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
	for b.Loop() {
		if _, err := BuildBatch(BatchInput{ResultsFile: path, Rows: res.Rows, ItemsFile: "items.csv", Items: items}); err != nil {
			b.Fatal(err)
		}
	}
}
