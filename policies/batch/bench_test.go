package batch

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"testing"
	"time"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/policies"
	"ergostock/policies/internal/cputime"
)

// catalogue describes a synthetic catalogue for writeSynthetic.
type catalogue struct {
	n, weeks  int
	seed      uint64
	lostEvery int // every lostEvery-th item is in lost-sales mode; 0: none
	maxLead   int // lead times are drawn uniformly from 0..maxLead
	// daily writes one history row per day with demand (rates a seventh of
	// the weekly ones) and is read by day; review > 0 adds the items column
	// review_period (issue 12: weekly review of daily demand).
	daily  bool
	review int
}

// writeSynthetic writes a seeded catalogue of c.n SKUs with c.weeks weeks
// of history, one row per SKU and week with demand (dated the Monday),
// mixing the four demand patterns; invented data, for timing only. Half the
// items carry an order cost (an s-S search) and a third give a current
// s-S policy.
func writeSynthetic(tb testing.TB, dir string, c catalogue) (itemsPath, histPath string) {
	n, weeks, seed := c.n, c.weeks, c.seed
	tb.Helper()
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	itemsPath, histPath = filepath.Join(dir, "items.csv"), filepath.Join(dir, "history.csv")
	fi, err := os.Create(itemsPath)
	if err != nil {
		tb.Fatal(err)
	}
	fh, err := os.Create(histPath)
	if err != nil {
		tb.Fatal(err)
	}
	wi, wh := bufio.NewWriter(fi), bufio.NewWriter(fh)
	reviewCol := ""
	if c.review > 0 {
		reviewCol = ",review_period"
	}
	fmt.Fprintln(wi, "sku,lead_time,holding_cost,shortage_cost,order_cost,unmet,current_reorder_point,current_order_up_to"+reviewCol)
	fmt.Fprintln(wh, "sku,date,quantity")
	monday := time.Date(2024, 12, 30, 0, 0, 0, 0, time.UTC) // ISO week 1 of 2025
	step, scale := 7, 1.0
	if c.daily {
		weeks, step, scale = 7*weeks, 1, 7
	}
	dates := make([]string, weeks)
	for w := range dates {
		dates[w] = monday.AddDate(0, 0, step*w).Format("2006-01-02")
	}
	poisson := func(lam float64) int {
		// Knuth's multiplication method; lam is small here.
		l, k, p := math.Exp(-lam), 0, 1.0
		for {
			p *= rng.Float64()
			if p <= l {
				return k
			}
			k++
		}
	}
	for i := range n {
		sku := fmt.Sprintf("SKU-%05d", i)
		var size func() int
		prob := 1.0
		switch i % 4 {
		case 0: // smooth
			m := (1 + 15*rng.Float64()) / scale
			size = func() int { return poisson(m) }
		case 1: // erratic: a gamma-Poisson mixture
			m := (2 + 8*rng.Float64()) / scale
			size = func() int { return poisson(m * rng.ExpFloat64()) }
		case 2: // intermittent
			prob = (0.2 + 0.3*rng.Float64()) / scale
			size = func() int { return 1 + poisson(1) }
		default: // lumpy
			prob = (0.2 + 0.3*rng.Float64()) / scale
			size = func() int { return 1 + poisson(6*rng.ExpFloat64()) }
		}
		for w := range weeks {
			if rng.Float64() < prob {
				if q := size(); q > 0 {
					fmt.Fprintf(wh, "%s,%s,%d\n", sku, dates[w], q)
				}
			}
		}
		lead := rng.IntN(c.maxLead + 1)
		h := 0.1 + rng.Float64()
		b := h * (5 + 20*rng.Float64())
		k := ""
		if i%2 == 0 {
			k = fmt.Sprintf("%.2f", 5+50*rng.Float64())
		}
		mode := "backorder"
		if c.lostEvery > 0 && i%c.lostEvery == c.lostEvery-1 {
			mode = "lost"
		}
		cs, cS := "", ""
		if i%3 == 0 {
			cs, cS = "2", "12"
		}
		fmt.Fprintf(wi, "%s,%d,%.3f,%.3f,%s,%s,%s,%s", sku, lead, h, b, k, mode, cs, cS)
		if c.review > 0 {
			fmt.Fprintf(wi, ",%d", c.review)
		}
		fmt.Fprintln(wi)
	}
	for _, o := range []struct {
		w *bufio.Writer
		f *os.File
	}{{wi, fi}, {wh, fh}} {
		if err := o.w.Flush(); err != nil {
			tb.Fatal(err)
		}
		if err := o.f.Close(); err != nil {
			tb.Fatal(err)
		}
	}
	return itemsPath, histPath
}

// runFiles is what "ergostock batch" does, without the command line.
func runFiles(tb testing.TB, itemsPath, histPath, outPath string, workers int, pl *Planner) (failed int) {
	return runFilesBy(tb, itemsPath, histPath, outPath, workers, pl, history.Week)
}

// runFilesBy is runFiles with the history summed into periods of per.
func runFilesBy(tb testing.TB, itemsPath, histPath, outPath string, workers int, pl *Planner, per history.Period) (failed int) {
	fi, err := os.Open(itemsPath)
	if err != nil {
		tb.Fatal(err)
	}
	items, err := ReadItems(fi, itemsPath, nil)
	fi.Close()
	if err != nil {
		tb.Fatal(err)
	}
	fh, err := os.Open(histPath)
	if err != nil {
		tb.Fatal(err)
	}
	h, err := history.Read(fh, histPath, per)
	fh.Close()
	if err != nil {
		tb.Fatal(err)
	}
	pl.Fit, pl.Pattern = HistoryFit(h, nil)
	err = WriteFileAtomic(outPath, func(w io.Writer) error {
		bw := NewWriter(w)
		if err := bw.WriteHeader(); err != nil {
			return err
		}
		if err := pl.PlanAll(context.Background(), items, RunOptions{Workers: workers}, func(r *Row) error {
			if r.Err != nil {
				failed++
			}
			return bw.Write(r)
		}); err != nil {
			return err
		}
		return bw.Flush()
	})
	if err != nil {
		tb.Fatal(err)
	}
	return failed
}

// BenchmarkBatch plans a synthetic catalogue of 104 weekly periods per SKU,
// all in backorder mode with lead times 0..4, from the files to the results
// file on all cores. The target (issue 6) is under 60 s for 10,000 SKUs on
// 2 cores:
//
//	go test -run '^$' -bench 'Batch/skus=10000' -benchtime 1x -benchmem ./policies/batch
//
// The fit-only variants replace the search and evaluation by a constant
// answer, to tell the reading and fitting time from the optimisation's.
func BenchmarkBatch(b *testing.B) {
	for _, n := range []int{1000, 10000} {
		benchCatalogue(b, fmt.Sprintf("skus=%d", n), catalogue{n: n, weeks: 104, seed: 20261202, maxLead: 4})
	}
}

// BenchmarkBatchWeeklyReview plans the catalogue of BenchmarkBatch with a
// daily history (728 days a SKU, daily rates a seventh of the weekly ones,
// lead times 0..14 days), reviewed every day (review=1) and every 7 days
// (review=7, the items column review_period), beside BenchmarkBatch's own
// weekly catalogue (weekly), all three in every iteration so that the load
// of a shared machine falls on each alike; it reports the seconds of each
// and the ratios (issue 12 item 9 asks the weekly review of daily demand
// within 2x today's time).
//
//	go test -run '^$' -bench 'BatchWeeklyReview/skus=10000' -benchtime 3x ./policies/batch
func BenchmarkBatchWeeklyReview(b *testing.B) {
	for _, n := range []int{1000, 10000} {
		b.Run(fmt.Sprintf("skus=%d", n), func(b *testing.B) {
			type cat struct {
				c           catalogue
				items, hist string
				per         history.Period
				took        time.Duration
			}
			cats := []*cat{
				{c: catalogue{n: n, weeks: 104, seed: 20261202, maxLead: 4}, per: history.Week},
				{c: catalogue{n: n, weeks: 104, seed: 20261202, maxLead: 14, daily: true, review: 1}, per: history.Day},
				{c: catalogue{n: n, weeks: 104, seed: 20261202, maxLead: 14, daily: true, review: 7}, per: history.Day},
			}
			for i, c := range cats {
				dir := filepath.Join(b.TempDir(), fmt.Sprint(i))
				if err := os.Mkdir(dir, 0o755); err != nil {
					b.Fatal(err)
				}
				c.items, c.hist = writeSynthetic(b, dir, c.c)
			}
			out := filepath.Join(b.TempDir(), "results.csv")
			for b.Loop() {
				for _, c := range cats {
					t0 := time.Now()
					if f := runFilesBy(b, c.items, c.hist, out, runtime.GOMAXPROCS(0), &Planner{}, c.per); f > 0 {
						b.Fatalf("%d items failed", f)
					}
					c.took += time.Since(t0)
				}
			}
			sec := func(c *cat) float64 { return c.took.Seconds() / float64(b.N) }
			b.ReportMetric(sec(cats[0]), "s-weekly")
			b.ReportMetric(sec(cats[1]), "s-review=1")
			b.ReportMetric(sec(cats[2]), "s-review=7")
			b.ReportMetric(sec(cats[2])/sec(cats[1]), "review7/review1")
			b.ReportMetric(sec(cats[2])/sec(cats[0]), "review7/weekly")
		})
	}
}

// BenchmarkBatchLost times lost-sales items, whose chain holds the whole
// pipeline of outstanding orders and so grows like S^L/L! with the lead
// time L (see package policies); lead times 0..2 here.
//
//	go test -run '^$' -bench 'BatchLost' -benchtime 1x -benchmem ./policies/batch
func BenchmarkBatchLost(b *testing.B) {
	benchCatalogue(b, "skus=100", catalogue{n: 100, weeks: 104, seed: 20261202, lostEvery: 1, maxLead: 2})
}

// BenchmarkBatchGoals times the catalogues of issue 14's goals: 10,000
// SKUs of which 5% are lost-sales items with lead times up to 4, and
// 100,000 backorder SKUs (both under 60 s on two cores).
func BenchmarkBatchGoals(b *testing.B) {
	benchCatalogue(b, "skus=10000,lost=5%,L<=4", catalogue{n: 10000, weeks: 104, seed: 20261202, lostEvery: 20, maxLead: 4})
	benchCatalogue(b, "skus=100000,backorder", catalogue{n: 100000, weeks: 104, seed: 20261202, maxLead: 4})
}

// BenchmarkBatchLostL4 is the lost-sales share of BenchmarkBatchGoals'
// first catalogue alone: 100 lost-sales items with lead times up to 4.
func BenchmarkBatchLostL4(b *testing.B) {
	benchCatalogue(b, "skus=100,L<=4", catalogue{n: 100, weeks: 104, seed: 20261202, lostEvery: 1, maxLead: 4})
}

func benchCatalogue(b *testing.B, name string, c catalogue) {
	dir := b.TempDir()
	itemsPath, histPath := writeSynthetic(b, dir, c)
	out := filepath.Join(dir, "results.csv")
	for _, mode := range []string{"fit-only", "full"} {
		b.Run(name+"/"+mode, func(b *testing.B) {
			b.ReportAllocs()
			failed := 0
			defer cputime.Report(b, cputime.Process())

			for b.Loop() {
				pl := &Planner{}
				if mode == "fit-only" {
					pl.Optimize = func(sys inventory.System, k policies.Kind, o policies.SearchOptions) (*policies.Optimum, error) {
						return &policies.Optimum{Evaluation: policies.Evaluation{Policy: policies.Policy{Kind: k}}}, nil
					}
					pl.Evaluate = func(sys inventory.System, p policies.Policy, o policies.Options) (*policies.Evaluation, error) {
						return &policies.Evaluation{Policy: p}, nil
					}
				}
				per := history.Week
				if c.daily {
					per = history.Day
				}
				failed = runFilesBy(b, itemsPath, histPath, out, runtime.GOMAXPROCS(0), pl, per)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(c.n)/1e3, "µs/sku")
			b.ReportMetric(float64(failed), "failed")
		})
	}
}
