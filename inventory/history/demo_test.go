package history

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestDemoData checks that the demo history (data/history.csv, made by
// data/gen) reads in weeks and holds every demand pattern, short histories
// and a trend, and no fault; the messy example (data/messy/history.csv)
// holds one bad row and one SKU without demand.
func TestDemoData(t *testing.T) {
	count := demoCounts(t, filepath.Join("..", "..", "data", "history.csv"))
	for _, k := range []string{"smooth", "erratic", "intermittent", "lumpy", "short history", "trend"} {
		if count[k] == 0 {
			t.Errorf("no SKU with %s", k)
		}
	}
	for _, k := range []string{"error", "bad row skipped"} {
		if count[k] != 0 {
			t.Errorf("%d SKUs with %s in the clean demo", count[k], k)
		}
	}
	count = demoCounts(t, filepath.Join("..", "..", "data", "messy", "history.csv"))
	for _, k := range []string{"error", "bad row skipped"} {
		if count[k] != 1 {
			t.Errorf("%d SKUs with %s in the messy example, want 1", count[k], k)
		}
	}
}

// demoCounts reads a demo history in weeks and counts its SKUs by pattern,
// model, error and warning.
func demoCounts(t *testing.T, path string) map[string]int {
	f, err := os.Open(path)
	if err != nil {
		t.Skip(err)
	}
	defer f.Close()
	h, err := Read(f, "history.csv", Week)
	if err != nil {
		t.Fatal(err)
	}
	if got := h.Label(h.Last); got != "2026-W48" {
		t.Errorf("last week %s, want 2026-W48", got)
	}
	count := map[string]int{}
	for _, k := range h.SKUs {
		s, err := k.Fit()
		if testing.Verbose() {
			model := ""
			if s.Demand != nil {
				model = s.Demand.String()
			}
			t.Logf("%-28s %3d %-12s %8.2f %10.2f %s %q %v", k.SKU, s.Periods, s.Pattern, s.Mean, s.Variance, model, s.Warnings, err)
		}
		switch {
		case err != nil:
			count["error"]++
		default:
			count[string(s.Pattern)]++
			count["model "+s.Model()]++
		}
		for _, w := range s.Warnings {
			count[strings.SplitN(w, ":", 2)[0]]++
		}
	}
	t.Logf("%s: %d SKUs: %v", path, len(h.SKUs), count)
	return count
}
