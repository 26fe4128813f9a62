package batch

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"ergostock/inventory"
	"ergostock/policies"
)

// The tests below check the containment of a bad item (issue 10, items 2
// and 3) on fakes: steps that panic, sleep past their budget, honour or
// ignore their context, or return figures that overflowed. The engine is
// not involved, so they hold whatever the engine does.

// stepsFor builds a Planner whose steps misbehave by SKU.
func stepsFor(t *testing.T) *Planner {
	t.Helper()
	slow := func(ctx context.Context, d time.Duration) {
		select {
		case <-time.After(d):
		case <-ctx.Done():
		}
	}
	return &Planner{
		Fit: func(sku string) (*Fitted, error) {
			switch sku {
			case "FIT-SLOW":
				time.Sleep(2 * time.Second) // ignores any context
			case "FIT-PANIC":
				var m map[string]int
				m["x"]++ // a nil-map write: a runtime panic, as a bug would give
			}
			return &Fitted{Demand: pointMass(4), Pattern: "smooth"}, nil
		},
		Optimize: func(sys inventory.System, kind policies.Kind, so policies.SearchOptions) (*policies.Optimum, error) {
			ctx := so.Eval.Context
			if ctx == nil {
				return nil, errors.New("no context given to the search")
			}
			switch int(sys.Holding * 10) {
			case 11: // sleeps without looking at its context
				time.Sleep(2 * time.Second)
			case 12: // honours its context, as the engine will
				slow(ctx, 2*time.Second)
				if err := ctx.Err(); err != nil {
					return nil, fmt.Errorf("search stopped: %w", err)
				}
			case 13:
				panic("index out of range [7] with length 7")
			}
			o, err := fakeOptimize(sys, kind, so)
			if err != nil {
				return nil, err
			}
			switch int(sys.Holding * 10) {
			case 14:
				o.Figures.TotalCost = math.Inf(1)
			case 15:
				o.Figures.FillRate = math.NaN()
			case 16:
				o.Figures.MeanOnHand = -2
			case 17:
				o.Diagnostics.Residual = math.NaN()
			}
			return o, nil
		},
		Evaluate: func(sys inventory.System, p policies.Policy, opt policies.Options) (*policies.Evaluation, error) {
			ev, err := fakeEvaluate(sys, p, opt)
			if int(sys.Holding*10) == 18 {
				ev.Figures.TotalCost = math.Inf(1)
			}
			return ev, err
		},
	}
}

func TestPlanAllContainsBadItems(t *testing.T) {
	items := readItems(t, "sku,lead_time,holding_cost,shortage_cost,current_order_up_to\n"+
		"OK-0,1,1,9,\n"+
		"FIT-SLOW,1,1,9,\n"+
		"OPT-SLEEPS,1,1.1,9,\n"+
		"OPT-HONOURS,1,1.2,9,\n"+
		"OPT-PANIC,1,1.3,9,\n"+
		"FIT-PANIC,1,1,9,\n"+
		"INF-COST,1,1.4,9,\n"+
		"NAN-FILL,1,1.5,9,\n"+
		"NEG-STOCK,1,1.6,9,\n"+
		"NAN-RESIDUAL,1,1.7,9,\n"+
		"INF-CURRENT,1,1.8,9,10\n"+
		"OK-11,1,1,9,10\n")
	want := []string{
		"",
		"item took longer than --item-timeout 300ms (while fitting the demand history)",
		"item took longer than --item-timeout 300ms (while optimizing base-stock)",
		"item took longer than --item-timeout 300ms (while optimizing base-stock)",
		"internal error: index out of range [7] with length 7",
		"internal error: assignment to entry in nil map",
		"total_cost +Inf: want a finite figure >= 0 (the item's costs or demand are too large for double precision)",
		"fill_rate NaN: want a finite figure >= 0 (the item's costs or demand are too large for double precision)",
		"mean_on_hand -2: want a finite figure >= 0 (the item's costs or demand are too large for double precision)",
		"residual NaN: want a finite figure >= 0 (the item's costs or demand are too large for double precision)",
		"current_total_cost +Inf: want a finite figure >= 0 (the item's costs or demand are too large for double precision)",
		"",
	}
	for _, workers := range []int{1, 2, 5} {
		t.Run(fmt.Sprint("workers=", workers), func(t *testing.T) {
			pl := stepsFor(t)
			var got []Row
			start := time.Now()
			err := pl.PlanAll(context.Background(), items, RunOptions{Workers: workers, ItemTimeout: 300 * time.Millisecond},
				func(r *Row) error { got = append(got, *r); return nil })
			if err != nil {
				t.Fatal(err)
			}
			// Three items outlast their budget; with one worker they run one
			// after another, so 3 x 300 ms plus the rest, far below the 2 s
			// each of them would take if the run waited for them.
			if el := time.Since(start); el > 1900*time.Millisecond {
				t.Errorf("run took %v: it waited for items past their budget", el)
			}
			if len(got) != len(items) {
				t.Fatalf("%d rows, want %d", len(got), len(items))
			}
			for i, r := range got {
				if r.Item != i || r.SKU != items[i].SKU {
					t.Errorf("row %d is item %d %q, want %q", i, r.Item, r.SKU, items[i].SKU)
				}
				if g := errText(r.Err); g != want[i] {
					t.Errorf("%s: error %q, want %q", r.SKU, g, want[i])
				}
				if r.Err != nil && (r.Figures != nil || r.Policy != nil || r.CurrentTotalCost != nil) {
					t.Errorf("%s: failed row keeps figures", r.SKU)
				}
				if r.Err == nil && r.Figures == nil {
					t.Errorf("%s: planned row has no figures", r.SKU)
				}
			}
			var te *TimeoutError
			if !errors.As(got[3].Err, &te) || te.Limit != 300*time.Millisecond {
				t.Errorf("OPT-HONOURS: %#v, want a *TimeoutError", got[3].Err)
			}
			var pe *PanicError
			if !errors.As(got[4].Err, &pe) || len(pe.Stack) == 0 {
				t.Errorf("OPT-PANIC: %#v, want a *PanicError with the stack", got[4].Err)
			}
		})
	}
}

// A slow item must not hold the others back: with the bounded window of
// the first runner (16 results per worker), item 0 below would wait for
// ever for the 199 others; now they all finish while it runs.
func TestRunDoesNotWaitForASlowItem(t *testing.T) {
	const n = 200
	var finished atomic.Int64
	allOthers := make(chan struct{})
	err := Run(context.Background(), n, RunOptions{Workers: 2}, func(_ context.Context, i int) int {
		if i == 0 {
			select {
			case <-allOthers:
				return 0
			case <-time.After(5 * time.Second):
				return -1
			}
		}
		if finished.Add(1) == n-1 {
			close(allOthers)
		}
		return i
	}, failInt, func(i, v int) error {
		if v != i {
			return fmt.Errorf("item %d gave %d: it waited for the others in vain", i, v)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
}

// Items that ignore their deadline run on after it, but at most two per
// worker at once: the goroutines of deaf items cannot pile up.
func TestRunBoundsAbandonedItems(t *testing.T) {
	var live, peak atomic.Int64
	const workers = 1
	err := Run(context.Background(), 8, RunOptions{Workers: workers, ItemTimeout: 20 * time.Millisecond},
		func(_ context.Context, i int) int {
			n := live.Add(1)
			for {
				p := peak.Load()
				if n <= p || peak.CompareAndSwap(p, n) {
					break
				}
			}
			time.Sleep(150 * time.Millisecond) // deaf to its context
			live.Add(-1)
			return i
		},
		func(i int, err error) int {
			var te *TimeoutError
			if !errors.As(err, &te) {
				t.Errorf("item %d: %v, want a *TimeoutError", i, err)
			}
			return -1
		},
		func(i, v int) error {
			if v != -1 {
				t.Errorf("item %d finished within 20 ms of a 150 ms sleep", i)
			}
			return nil
		})
	if err != nil {
		t.Fatal(err)
	}
	if p := peak.Load(); p > 3*workers {
		t.Errorf("%d items ran at once, want at most %d (the worker's and two abandoned)", p, 3*workers)
	}
}

func TestRunCancelStopsWaiting(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	var emitted atomic.Int64
	start := time.Now()
	go func() {
		time.Sleep(100 * time.Millisecond)
		cancel()
	}()
	err := Run(ctx, 100, RunOptions{Workers: 2}, func(_ context.Context, i int) int {
		if i == 3 {
			time.Sleep(3 * time.Second) // stuck, and deaf to its context
		}
		return i
	}, func(i int, err error) int { return -1 }, func(i, v int) error { emitted.Add(1); return nil })
	if !errors.Is(err, context.Canceled) {
		t.Errorf("got %v, want context.Canceled", err)
	}
	if el := time.Since(start); el > 2*time.Second {
		t.Errorf("Run returned after %v: it waited for a stuck item after the cancel", el)
	}
	if e := emitted.Load(); e > 3 {
		t.Errorf("%d rows emitted, want at most the 3 before the stuck one", e)
	}
}

func TestGuard(t *testing.T) {
	for _, tt := range []struct{ in, out string }{
		{"BP-220", "BP-220"},
		{"=HYPERLINK(\"http://x\")", "'=HYPERLINK(\"http://x\")"},
		{"+41 22", "'+41 22"},
		{"-12", "'-12"},
		{"@SUM(A1)", "'@SUM(A1)"},
		{"\tTAB", "'\tTAB"},
		{"'quoted", "''quoted"},
		{"a\r\nb\nc", "a b c"}, // folded: every row is one line
		{"", ""},
	} {
		if g := Guard(tt.in); g != tt.out {
			t.Errorf("Guard(%q) = %q, want %q", tt.in, g, tt.out)
		}
		if !strings.ContainsAny(tt.in, "\r\n") {
			if back := Unguard(Guard(tt.in)); back != tt.in {
				t.Errorf("Unguard(Guard(%q)) = %q", tt.in, back)
			}
		}
	}
}

// The writer guards text cells only: a negative number stays a number.
func TestWriterGuardsTextCellsOnly(t *testing.T) {
	f := inventory.Figures{FillRate: 1, TotalCost: 2}
	cur := 1.0
	p := policies.Policy{Kind: policies.BaseStock, OrderUpTo: 3}
	r := Row{Item: 0, SKU: "=1+1", Demand: "pmf:1=1", Policy: &p, Figures: &f, CurrentTotalCost: &cur,
		Warnings: []string{"-x"}}
	var b strings.Builder
	w := NewWriter(&b)
	w.Write(&r)
	w.Flush()
	rec := strings.Split(strings.TrimSuffix(b.String(), "\n"), ",")
	h := Header()
	cell := func(name string) string {
		for i, n := range h {
			if n == name {
				return rec[i]
			}
		}
		t.Fatalf("no column %s", name)
		return ""
	}
	for name, want := range map[string]string{"sku": "'=1+1", "saving": "-1", "warnings": "'-x", "total_cost": "2"} {
		if g := cell(name); g != want {
			t.Errorf("%s cell %q, want %q", name, g, want)
		}
	}
}

func TestPlanRefusesLineBreakInSKU(t *testing.T) {
	pl := stepsFor(t)
	r := pl.Plan(Item{SKU: "A\nB", System: inventory.System{Holding: 1, Shortage: 9}})
	if g, want := errText(r.Err), `sku "A\nB": want a SKU without line breaks`; g != want {
		t.Errorf("got %q, want %q", g, want)
	}
	var b strings.Builder
	w := NewWriter(&b)
	w.Write(&r)
	w.Flush()
	if n := strings.Count(b.String(), "\n"); n != 1 {
		t.Errorf("row written on %d lines: %q", n, b.String())
	}
}

func TestMeta(t *testing.T) {
	m := Meta{Format: MetaFormat, Period: "month", Items: "0123456789abcdef", History: "none",
		MaxStates: 1000, Shard: Shard{K: 2, N: 5}, Version: "1.2.3"}
	m.Run = m.RunDigest()
	got, err := ParseMeta(m.String()+"\r\n", "r.csv", 1)
	if err != nil {
		t.Fatal(err)
	}
	if *got != m {
		t.Errorf("round trip: %+v, want %+v", *got, m)
	}
	if strings.Contains(m.String(), ",") {
		t.Errorf("header record %q holds a comma: it would split into cells", m)
	}
	// The run digest ignores the shard, so that the parts of one run
	// share it, and changes with anything that shapes the figures.
	other := m
	other.Shard = Shard{K: 0, N: 5}
	if other.RunDigest() != m.Run {
		t.Error("the run digest depends on the shard")
	}
	for _, change := range []func(*Meta){
		func(x *Meta) { x.Period = "week" },
		func(x *Meta) { x.Items = "fedcba9876543210" },
		func(x *Meta) { x.History = "0000000000000000" },
		func(x *Meta) { x.MaxStates = 999 },
	} {
		x := m
		change(&x)
		if x.RunDigest() == m.Run {
			t.Errorf("run digest unchanged by %+v", x)
		}
	}
	if _, err := ParseMeta(m.String()+"; future=1", "r.csv", 1); err != nil {
		t.Errorf("an unknown key: %v, want it ignored", err)
	}
	for _, tt := range []struct{ line, want string }{
		{"# ergostock results v3; period=week; items=x", "r.csv:1: results format v3: this ergostock reads up to v2; use a newer version"},
		{"# some other comment", `r.csv:1: header record "# some other comment": want a line starting "# ergostock results v"`},
		{"# ergostock results v2; run=abc", `r.csv:1: header record "# ergostock results v2; run=abc": want period= and items= fields`},
	} {
		_, err := ParseMeta(tt.line, "r.csv", 1)
		if g := errText(err); g != tt.want {
			t.Errorf("%q:\n got %s\nwant %s", tt.line, g, tt.want)
		}
	}
}

func TestAtomicFileLockAndSweep(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "results.csv")
	// What a killed run leaves: its temporary file and its (unlocked) lock
	// file; and a file of another name that must survive.
	stale := filepath.Join(dir, ".results.csv.ergostock-tmp-4000000")
	for _, f := range []string{stale, filepath.Join(dir, ".results.csv.ergostock-lock"), filepath.Join(dir, "keep.csv")} {
		if err := os.WriteFile(f, []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	a, err := CreateAtomic(path)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(stale); !os.IsNotExist(err) {
		t.Errorf("stale temporary file not removed: %v", err)
	}
	// A second writer of the same file is refused while the first holds it.
	_, err = CreateAtomic(path)
	var be *BusyError
	if !errors.As(err, &be) || be.PID != os.Getpid() {
		t.Fatalf("second writer: %v, want a *BusyError naming pid %d", err, os.Getpid())
	}
	if want := fmt.Sprintf("another ergostock run (pid %d) is writing it", os.Getpid()); !strings.Contains(err.Error(), want) {
		t.Errorf("message %q does not say %q", err, want)
	}
	a.Write([]byte("new\n"))
	if err := a.Commit(); err != nil {
		t.Fatal(err)
	}
	a.Abort() // after Commit: does nothing
	ents, _ := os.ReadDir(dir)
	var names []string
	for _, e := range ents {
		names = append(names, e.Name())
	}
	if strings.Join(names, " ") != "keep.csv results.csv" {
		t.Errorf("directory holds %v, want keep.csv results.csv", names)
	}
	// Abort leaves the old file and nothing else.
	a, err = CreateAtomic(path)
	if err != nil {
		t.Fatal(err)
	}
	a.Write([]byte("half"))
	a.Abort()
	if b, _ := os.ReadFile(path); string(b) != "new\n" {
		t.Errorf("after Abort the file holds %q", b)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 2 {
		t.Errorf("after Abort the directory holds %d entries, want 2", len(ents))
	}
	for _, tt := range []struct{ path, want string }{
		{dir, dir + " is a directory: want a file name"},
		{filepath.Join(dir, "no", "r.csv"), "cannot create a file in " + filepath.Join(dir, "no") + ": no such file or directory"},
	} {
		_, err := CreateAtomic(tt.path)
		if g := errText(err); g != tt.want {
			t.Errorf("%s: got %q, want %q", tt.path, g, tt.want)
		}
	}
}

// Items are started in the order asked for (most expensive first by
// default), and the results still come out in input order.
func TestRunStartOrder(t *testing.T) {
	var started []int
	var mu sync.Mutex
	order := []int{3, 1, 4, 0, 2}
	var got []int
	err := Run(context.Background(), 5, RunOptions{Workers: 1, Order: order},
		func(_ context.Context, i int) int {
			mu.Lock()
			started = append(started, i)
			mu.Unlock()
			return i * 10
		},
		func(i int, err error) int { return -1 },
		func(i, v int) error { got = append(got, v); return nil })
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(started) != fmt.Sprint(order) || fmt.Sprint(got) != "[0 10 20 30 40]" {
		t.Errorf("started %v, emitted %v", started, got)
	}
	if err := Run(context.Background(), 3, RunOptions{Workers: 1, Order: []int{0, 0, 1}}, func(context.Context, int) int { return 0 }, func(int, error) int { return 0 }, func(int, int) error { return nil }); err == nil {
		t.Error("an order that is not a permutation was accepted")
	}
	items := []Item{{SKU: "a"}, {SKU: "b", System: inventory.System{Mode: inventory.Lost, LeadTime: 3}}, {SKU: "c", System: inventory.System{LeadTime: 8}}, {SKU: "d", System: inventory.System{Mode: inventory.Lost, LeadTime: 1}}}
	if got := fmt.Sprint(CostOrder(items)); got != "[1 3 2 0]" {
		t.Errorf("CostOrder = %s, want [1 3 2 0]", got)
	}
}
