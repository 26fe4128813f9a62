package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"ergostock/policies/batch"
)

// The hostile-input suite: inputs a careless or hostile user gives every
// command, run through the built binary under a memory cap and a time
// limit. Each case asserts the exit status, that nothing panicked or ran out
// of memory, and that a refusal is one line on stderr naming the input.

// hostileMemoryKB caps the address space of each run (ulimit -v). The Go
// runtime reserves little up front, so 3 GiB leaves room for honest work
// and turns any runaway allocation into a fatal error the test sees.
const hostileMemoryKB = 3 << 20

// hostileTimeout is the longest any one refusal may take.
const hostileTimeout = 60 * time.Second

type hostileCase struct {
	name  string
	args  []string          // after the binary; "{dir}" is the case's directory
	files map[string]string // written into {dir} first
	stdin string
	code  int      // wanted exit status
	names []string // substrings the message must hold (the input it names)
}

// buildBinary builds cmd/ergostock once for the suite.
func buildBinary(t *testing.T) string {
	t.Helper()
	if _, err := exec.LookPath("bash"); err != nil {
		t.Skip("bash is needed for the memory cap")
	}
	bin := filepath.Join(t.TempDir(), "ergostock")
	out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput()
	if err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

func TestHostileInputs(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary and runs a few hundred processes")
	}
	bin := buildBinary(t)
	cases := hostileCases()
	if len(cases) < 200 {
		t.Fatalf("the suite holds %d cases, want at least 200", len(cases))
	}
	seen := map[string]bool{}
	for _, c := range cases {
		if seen[c.name] {
			t.Fatalf("case name %q used twice", c.name)
		}
		seen[c.name] = true
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			runHostile(t, bin, c)
		})
	}
}

func runHostile(t *testing.T, bin string, c hostileCase) {
	dir := t.TempDir()
	for name, body := range c.files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	args := make([]string, len(c.args))
	for i, a := range c.args {
		args[i] = strings.ReplaceAll(a, "{dir}", dir)
	}
	ctx, cancel := context.WithTimeout(context.Background(), hostileTimeout)
	defer cancel()
	script := fmt.Sprintf(`ulimit -v %d; exec "$@"`, hostileMemoryKB)
	cmd := exec.CommandContext(ctx, "bash", append([]string{"-c", script, "ergostock", bin}, args...)...)
	cmd.Dir = dir
	cmd.Stdin = strings.NewReader(c.stdin)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	err := cmd.Run()
	if ctx.Err() != nil {
		t.Fatalf("ergostock %s: still running after %v", strings.Join(c.args, " "), hostileTimeout)
	}
	code := 0
	var ee *exec.ExitError
	if errors.As(err, &ee) {
		code = ee.ExitCode()
	} else if err != nil {
		t.Fatal(err)
	}
	msg := stderr.String()
	for _, bad := range []string{"panic:", "goroutine ", "fatal error", "out of memory", "runtime error"} {
		if strings.Contains(msg, bad) {
			t.Fatalf("ergostock %s: crashed (exit %d):\n%.600s", strings.Join(c.args, " "), code, msg)
		}
	}
	for _, bad := range []string{"NaN", "Inf"} {
		if strings.Contains(stdout.String(), bad) {
			t.Errorf("ergostock %s: stdout holds %s:\n%.400s", strings.Join(c.args, " "), bad, stdout.String())
		}
	}
	if code != c.code {
		t.Errorf("ergostock %s: exit %d, want %d; stderr: %.400s", strings.Join(c.args, " "), code, c.code, msg)
	}
	if code == 0 || code == 3 {
		return
	}
	lines := strings.Split(strings.TrimRight(msg, "\n"), "\n")
	if len(lines) != 1 || !strings.HasPrefix(lines[0], "ergostock: ") {
		t.Errorf("ergostock %s: want one line starting \"ergostock: \", got %d lines:\n%.600s", strings.Join(c.args, " "), len(lines), msg)
	}
	for _, n := range c.names {
		if !strings.Contains(msg, n) {
			t.Errorf("ergostock %s: message does not name %q: %s", strings.Join(c.args, " "), n, strings.TrimSpace(msg))
		}
	}
	if stdout.Len() > 0 && code != 0 {
		t.Errorf("ergostock %s: exit %d but stdout holds %.200q", strings.Join(c.args, " "), code, stdout.String())
	}
}

// hostileCases lists the suite. The generated sweeps cover every numeric
// flag of the system commands with values of the wrong kind; the written
// cases follow the inputs reported against the tool.
func hostileCases() []hostileCase {
	var cs []hostileCase
	add := func(c hostileCase) { cs = append(cs, c) }

	sys := func(cmd string, extra ...string) []string {
		a := []string{cmd, "--demand", "poisson:mean=9", "--lead-time", "1", "--holding-cost", "0.4", "--shortage-cost", "12"}
		return append(a, extra...)
	}
	// with replaces the value of flag in args (or appends it).
	with := func(args []string, flag, value string) []string {
		out := append([]string(nil), args...)
		for i := 0; i+1 < len(out); i++ {
			if out[i] == flag {
				out[i+1] = value
				return out
			}
		}
		return append(out, flag, value)
	}
	policyOf := map[string][]string{
		"evaluate": {"--order-up-to", "20"},
		"optimize": nil,
		"simulate": {"--order-up-to", "20", "--periods", "2000", "--replications", "2"},
	}
	commands := []string{"evaluate", "optimize", "simulate"}

	// Cost flags: values that are not finite, non-negative numbers.
	for _, cmd := range commands {
		for _, flag := range []string{"--holding-cost", "--shortage-cost", "--order-cost", "--unit-cost"} {
			for _, v := range []string{"-1", "NaN", "Inf", "-Inf", "1e999", "abc", "", "1,5", "0x10", "9_000"} {
				add(hostileCase{
					name:  fmt.Sprintf("%s%s=%q", cmd, flag, v),
					args:  with(sys(cmd, policyOf[cmd]...), flag, v),
					code:  2,
					names: []string{flag},
				})
			}
		}
	}
	// Whole-number flags.
	for _, cmd := range commands {
		for _, flag := range []string{"--lead-time", "--max-states"} {
			for _, v := range []string{"-1", "1.5", "abc", "9223372036854775808", "99999999999999999999", ""} {
				add(hostileCase{
					name:  fmt.Sprintf("%s%s=%q", cmd, flag, v),
					args:  with(sys(cmd, policyOf[cmd]...), flag, v),
					code:  2,
					names: []string{flag, v},
				})
			}
		}
	}
	// Lead-time laws, lead-time models and review periods (issue 12):
	// evaluate and optimize; every refusal names its flag.
	for _, cmd := range []string{"evaluate", "optimize"} {
		base := sys(cmd, policyOf[cmd]...)
		for _, v := range []string{"-1", "0", "1.5", "abc", "100001", "9223372036854775808", ""} {
			add(hostileCase{name: fmt.Sprintf("%s--review-period=%q", cmd, v), args: with(base, "--review-period", v), code: 2, names: []string{"--review-period", v}})
		}
		for _, v := range []string{"foo", "sequentiall", "crossing", "1"} {
			add(hostileCase{name: fmt.Sprintf("%s--lead-time-model=%q", cmd, v), args: with(base, "--lead-time-model", v), code: 2, names: []string{"--lead-time-model", v}})
		}
		for _, c := range []struct {
			law   string
			code  int
			names []string
		}{
			{"pmf:2=0.2,3=0.5,5=0.3", 2, []string{"--lead-time", "hazard", "nearest"}},
			{"negbin:mean=4,var=40", 2, []string{"--lead-time", "hazard"}},
			{"pmf:1=0.5", 2, []string{"--lead-time", "sum to 1"}},
			{"pmf:-1=1", 2, []string{"--lead-time"}},
			{"poisson:mean=-1", 2, []string{"--lead-time"}},
			{"poisson:mean=NaN", 2, []string{"--lead-time"}},
			{"uniform:low=1", 2, []string{"--lead-time"}},
			{"pmf:", 2, []string{"--lead-time"}},
			{"poisson:mean=1e6", 1, []string{"--lead-time", "10000"}},
			{"pmf:1048577=1", 2, []string{"--lead-time", "1048576"}},
			{"pmf:4=1", 0, nil}, // a one-point law is the fixed lead time
		} {
			add(hostileCase{name: fmt.Sprintf("%s--lead-time=%q", cmd, c.law), args: with(base, "--lead-time", c.law), code: c.code, names: c.names})
		}
		law := with(base, "--lead-time", "pmf:1=0.2,2=0.5,3=0.3")
		// Lost sales under a law and a review period are exact; orders
		// that may cross are not, and the refusal points to simulate.
		add(hostileCase{name: cmd + "-lost-law", args: with(law, "--unmet", "lost"), code: 0})
		add(hostileCase{name: cmd + "-lost-review", args: with(with(base, "--unmet", "lost"), "--review-period", "7"), code: 0})
		add(hostileCase{name: cmd + "-lost-independent", args: with(with(law, "--unmet", "lost"), "--lead-time-model", "independent"), code: 1, names: []string{"--lead-time-model", "simulate"}})
		add(hostileCase{name: cmd + "-law-review-ok", args: with(law, "--review-period", "7"), code: 0})
	}
	// simulate plays the same laws, models and review periods literally
	// (both modes); it refuses what the System refuses, and a warm-up too
	// short for the longest lead time and the review period.
	{
		base := with(with(sys("simulate", "--reorder-point", "5", "--order-up-to", "20"), "--periods", "4000"), "--replications", "3")
		for _, v := range []string{"-1", "0", "abc", "100001"} {
			add(hostileCase{name: fmt.Sprintf("simulate--review-period=%q", v), args: with(base, "--review-period", v), code: 2, names: []string{"--review-period", v}})
		}
		add(hostileCase{name: "simulate--lead-time-model=crossing", args: with(base, "--lead-time-model", "crossing"), code: 2, names: []string{"--lead-time-model", "crossing"}})
		add(hostileCase{name: "simulate-kaplan-refused", args: with(base, "--lead-time", "pmf:2=0.2,3=0.5,5=0.3"), code: 2, names: []string{"--lead-time", "hazard", "nearest"}})
		law := with(base, "--lead-time", "pmf:1=0.2,2=0.5,3=0.3")
		add(hostileCase{name: "simulate-law-review", args: with(law, "--review-period", "7"), code: 0})
		add(hostileCase{name: "simulate-lost-law-review", args: with(with(law, "--review-period", "3"), "--unmet", "lost"), code: 0})
		add(hostileCase{name: "simulate-independent-ss", args: with(with(base, "--lead-time", "pmf:0=0.2,1=0.3,4=0.5"), "--lead-time-model", "independent"), code: 0})
		add(hostileCase{name: "simulate-law-short-warmup", args: with(with(law, "--review-period", "7"), "--warmup", "9"), code: 2, names: []string{"--warmup", "9"}})
		add(hostileCase{name: "simulate-L-1e9-review", args: with(with(base, "--lead-time", "1000000000"), "--review-period", "7"), code: 1, names: []string{"--lead-time", "1000000000"}})
		add(hostileCase{name: "simulate-law-wide", args: with(base, "--lead-time", "poisson:mean=1e6"), code: 1, names: []string{"--lead-time"}})
	}
	add(hostileCase{name: "evaluate-independent-ss", args: with(sys("evaluate", "--reorder-point", "5", "--order-up-to", "20"), "--lead-time-model", "independent"), code: 0}) // fixed lead time: both models agree
	add(hostileCase{name: "evaluate-independent-law-ss", args: with(with(sys("evaluate", "--reorder-point", "5", "--order-up-to", "20"), "--lead-time-model", "independent"), "--lead-time", "pmf:1=0.5,3=0.5"), code: 1, names: []string{"--lead-time-model", "simulate"}})
	add(hostileCase{name: "evaluate-independent-law-base-stock", args: with(with(sys("evaluate", "--order-up-to", "20"), "--lead-time-model", "independent"), "--lead-time", "pmf:1=0.5,3=0.5"), code: 0})
	add(hostileCase{name: "optimize-independent-law-base-stock", args: with(with(sys("optimize", "--policy", "base-stock"), "--lead-time-model", "independent"), "--lead-time", "pmf:2=0.2,3=0.5,5=0.3"), code: 0})

	// Demand specs that do not describe a law.
	for _, cmd := range commands {
		for _, d := range []string{
			"", "poisson", "poisson:", "poisson:mean=", "poisson:mean=-1", "poisson:mean=0",
			"poisson:mean=NaN", "poisson:mean=Inf", "poisson:mean=0x10", "poisson:mean=9_000",
			"poisson:lambda=3", "poisson:mean=3,mean=4", "negbin:mean=3,var=2", "negbin:mean=3",
			"normal:mean=3", "normal:mean=3,sd=-1", "gamma:mean=1,sd=0", "pmf:", "pmf:0=0.5",
			"pmf:0=0.5,0=0.5", "pmf:-1=1", "pmf:a=1", "pmf:0=1.5,1=-0.5", "uniform:low=1",
		} {
			add(hostileCase{
				name:  fmt.Sprintf("%s--demand=%q", cmd, d),
				args:  with(sys(cmd, policyOf[cmd]...), "--demand", d),
				code:  2,
				names: []string{"--demand"},
			})
		}
	}
	// Policy flags that do not make a policy.
	for _, cmd := range []string{"evaluate", "simulate"} {
		extra := policyOf[cmd][2:]
		for i, p := range [][]string{
			{},
			{"--reorder-point", "5"},
			{"--order-multiple", "5"},
			{"--order-up-to", "20", "--order-multiple", "5"},
			{"--reorder-point", "20", "--order-up-to", "20"},
			{"--reorder-point", "5", "--order-multiple", "0"},
			{"--reorder-point", "5", "--order-multiple", "-3"},
			{"--order-up-to", "abc"},
			{"--order-up-to", "12.5"},
			{"--order-up-to", "9223372036854775808"},
			{"--order-up-to", "-5", "--unmet", "lost"},
		} {
			add(hostileCase{
				name: fmt.Sprintf("%s-policy-%d", cmd, i),
				args: append(sys(cmd, p...), extra...),
				code: 2,
			})
		}
	}
	// Sizes: levels, supports and lead times far past any chain that can be
	// built. Each is refused before allocation, exit 1, naming the input.
	for _, c := range []struct {
		name string
		args []string
		want []string
		code int // 0 means 1
	}{
		{"evaluate-S-2e9", sys("evaluate", "--order-up-to", "2000000000"), []string{"--order-up-to"}, 0},
		{"evaluate-S-maxint", sys("evaluate", "--order-up-to", "9223372036854775807"), []string{"--order-up-to"}, 0},
		{"evaluate-snq-huge-s", sys("evaluate", "--reorder-point", "9223372036854775000", "--order-multiple", "5"), []string{"--reorder-point"}, 0},
		{"evaluate-snq-huge-Q", sys("evaluate", "--reorder-point", "3", "--order-multiple", "9223372036854775000"), []string{"--order-multiple"}, 0},
		{"evaluate-ss-wide", sys("evaluate", "--reorder-point", "-9223372036854775000", "--order-up-to", "9223372036854775000"), []string{"--order-up-to"}, 0},
		{"evaluate-lost-L-1e6", with(sys("evaluate", "--order-up-to", "20", "--unmet", "lost"), "--lead-time", "1000000"), []string{"--lead-time"}, 0},
		{"evaluate-backorder-L-1e6", with(sys("evaluate", "--order-up-to", "20"), "--lead-time", "1000000"), []string{"--lead-time"}, -1},
		{"evaluate-lost-max-states-1e8", with(sys("evaluate", "--order-up-to", "60", "--unmet", "lost", "--max-states", "100000000"), "--lead-time", "4"), []string{"states"}, -1},
		{"evaluate-poisson-1e9", with(sys("evaluate", "--order-up-to", "20"), "--demand", "poisson:mean=1e9"), []string{"--demand"}, -1},
		{"optimize-poisson-1e9", with(sys("optimize"), "--demand", "poisson:mean=1e9"), []string{"--demand"}, 0},
		{"optimize-negbin-var-1e18", with(sys("optimize"), "--demand", "negbin:mean=1,var=1e18"), []string{"--demand"}, 0},
		{"optimize-order-cost-1e15", sys("optimize", "--order-cost", "1e15"), []string{"--order-cost"}, 0},
		{"optimize-lost-L6", []string{"optimize", "--demand", "poisson:mean=20", "--lead-time", "6", "--unmet", "lost", "--policy", "base-stock", "--holding-cost", "1", "--shortage-cost", "9"}, nil, 0},
		{"simulate-S-2e9", sys("simulate", "--order-up-to", "2000000000"), []string{"--order-up-to"}, -1},
		{"simulate-S-maxint", sys("simulate", "--order-up-to", "9223372036854775807"), []string{"--order-up-to"}, 0},
		{"simulate-periods-maxint", sys("simulate", "--order-up-to", "20", "--periods", "9223372036854775807"), []string{"--periods"}, 0},
		{"simulate-lost-L-1e6", with(sys("simulate", "--order-up-to", "20", "--unmet", "lost"), "--lead-time", "1000000"), []string{"--warmup", "lead time 1000000"}, 2},
		{"simulate-replications-huge", sys("simulate", "--order-up-to", "20", "--replications", "9223372036854775807"), []string{"--replications"}, 0},
		{"evaluate-costs-1e308", sys("evaluate", "--order-up-to", "20", "--holding-cost", "1e308", "--shortage-cost", "1e308", "--json"), []string{"cost"}, 0},
		{"optimize-costs-1e308", sys("optimize", "--holding-cost", "1e308", "--shortage-cost", "1e308"), []string{"cost"}, 0},
		{"simulate-costs-1e308", sys("simulate", "--order-up-to", "20", "--periods", "2000", "--replications", "2", "--holding-cost", "1e308", "--shortage-cost", "1e308"), []string{"cost"}, 0},
		{"optimize-stockout-1e-16", sys("optimize", "--max-stockout-probability", "1e-16"), []string{"--max-stockout-probability"}, 0},
	} {
		code := c.code
		if code == 0 {
			code = 1
		}
		if code == -1 { // planned: large, but within what the engine handles
			code = 0
		}
		add(hostileCase{name: c.name, args: c.args, code: code, names: c.want})
	}

	// Transition matrices.
	for _, c := range []struct {
		name, body string
		args       []string
		code       int
		want       []string
	}{
		{"chain-empty", "", nil, 1, []string{"m.csv"}},
		{"chain-not-square", "0.5,0.5\n1,0\n0,1\n", nil, 1, []string{"m.csv"}},
		{"chain-row-sum", "0.5,0.6\n1,0\n", nil, 1, []string{"m.csv", "line 1"}},
		{"chain-negative", "1.5,-0.5\n0,1\n", nil, 1, []string{"m.csv", "line 1"}},
		{"chain-nan", "NaN,1\n0,1\n", nil, 1, []string{"m.csv", "line 1"}},
		{"chain-text", "a,b\nx,y\n", nil, 1, []string{"m.csv"}},
		{"chain-ragged", "0.5,0.5\n1\n", nil, 1, []string{"m.csv", "line 2"}},
		{"chain-list-misspelt", "from,to,prob\na,b,1\nb,a,1\n", nil, 1, []string{"m.csv", "from,to,probability"}},
		{"chain-list-bad-p", "from,to,probability\na,b,x\nb,a,1\n", nil, 1, []string{"m.csv", "line 2"}},
		{"chain-list-sum", "from,to,probability\na,b,0.5\nb,a,1\n", nil, 1, []string{"m.csv"}},
		{"chain-tol-10", "0.5,0.5\n0.5,0.5\n", []string{"--tol", "10"}, 2, []string{"--tol"}},
		{"chain-tol-0", "0.5,0.5\n0.5,0.5\n", []string{"--tol", "0"}, 2, []string{"--tol"}},
		{"chain-tol-neg", "0.5,0.5\n0.5,0.5\n", []string{"--tol", "-1"}, 2, []string{"--tol"}},
		{"chain-tol-nan", "0.5,0.5\n0.5,0.5\n", []string{"--tol", "NaN"}, 2, []string{"--tol"}},
		{"chain-max-iter-neg", "0.5,0.5\n0.5,0.5\n", []string{"--max-iter", "-1"}, 2, []string{"--max-iter"}},
		{"chain-method-bad", "0.5,0.5\n0.5,0.5\n", []string{"--method", "magic"}, 2, []string{"--method"}},
	} {
		args := append([]string{"chain", "--matrix", "{dir}/m.csv"}, c.args...)
		add(hostileCase{name: c.name, args: args, files: map[string]string{"m.csv": c.body}, code: c.code, names: c.want})
	}
	add(hostileCase{name: "chain-missing-file", args: []string{"chain", "--matrix", "{dir}/none.csv"}, code: 1, names: []string{"none.csv"}})
	add(hostileCase{name: "chain-drifting-birth-death", args: []string{"chain", "--matrix", "{dir}/m.csv", "--json"},
		files: map[string]string{"m.csv": birthDeathList(8000, 0.5, 0.45)}, code: 0})

	// Demand history for fit.
	const okHistory = "sku,date,quantity\nA,2025-01-06,3\nA,2025-01-13,4\nA,2025-01-20,0\nA,2025-01-27,5\n"
	for _, c := range []struct {
		name, body string
		code       int
		want       []string
	}{
		{"fit-empty", "", 1, []string{"h.csv"}},
		{"fit-header-only", "sku,date,quantity\n", 1, []string{"h.csv"}},
		{"fit-semicolon", "sku;date;quantity\nA;2025-01-06;3\n", 0, nil}, // read as ';'-delimited (issue 11)
		{"fit-missing-quantity", "sku,date\nA,2025-01-06\n", 1, []string{"h.csv", "quantity"}},
		{"fit-all-bad-rows", "sku,date,quantity\nA,2025-13-45,3\nA,yesterday,4\n", 1, []string{"h.csv"}},
		{"fit-quantity-huge", "sku,date,quantity\nA,2025-01-06,1e300\n", 1, []string{"h.csv"}},
		{"fit-binary", "\x00\x01\x02\xff\xfe", 1, []string{"h.csv"}},
	} {
		add(hostileCase{name: c.name, args: []string{"fit", "--history", "{dir}/h.csv"}, files: map[string]string{"h.csv": c.body}, code: c.code, names: c.want})
	}
	add(hostileCase{name: "fit-missing-file", args: []string{"fit", "--history", "{dir}/none.csv"}, code: 1, names: []string{"none.csv"}})
	add(hostileCase{name: "fit-by-location-without-column", args: []string{"fit", "--history", "{dir}/h.csv", "--by-location"}, files: map[string]string{"h.csv": okHistory}, code: 1, names: []string{"h.csv:1", "--by-location"}})
	add(hostileCase{name: "fit-period-bad", args: []string{"fit", "--history", "{dir}/h.csv", "--period", "fortnight"}, files: map[string]string{"h.csv": okHistory}, code: 2, names: []string{"--period"}})

	// Batch: items files whose bad rows must fail alone (exit 3), and runs
	// that cannot start (exit 1 or 2).
	const itemsHeader = "sku,lead_time,holding_cost,shortage_cost,order_cost,unit_cost,unmet,policy,min_fill_rate,demand,current_reorder_point,current_order_up_to,current_order_multiple\n"
	const goodItem = "GOOD,1,0.4,12,5,1,,,,poisson:mean=9,,,\n"
	for _, c := range []struct{ name, row string }{
		{"batch-current-S-2e9", "BAD,1,0.4,12,5,1,,,,poisson:mean=9,,2000000000,\n"},
		{"batch-poisson-1e9", "BAD,1,0.4,12,5,1,,,,poisson:mean=1e9,,,\n"},
		{"batch-order-cost-1e15", "BAD,1,0.4,12,1e15,1,,,,poisson:mean=9,,,\n"},
		{"batch-costs-1e308", "BAD,1,1e308,1e308,5,1,,,,poisson:mean=9,,,\n"},
		{"batch-lead-time-1e6-lost", "BAD,1000000,0.4,12,5,1,lost,,,poisson:mean=9,,,\n"},
		{"batch-bad-demand", "BAD,1,0.4,12,5,1,,,,poisson:mean=x,,,\n"},
		{"batch-negative-cost", "BAD,1,-0.4,12,5,1,,,,poisson:mean=9,,,\n"},
		{"batch-empty-sku", ",1,0.4,12,5,1,,,,poisson:mean=9,,,\n"},
		{"batch-bad-policy", "BAD,1,0.4,12,5,1,,magic,,poisson:mean=9,,,\n"},
		{"batch-bad-unmet", "BAD,1,0.4,12,5,1,maybe,,,poisson:mean=9,,,\n"},
		{"batch-fill-rate-2", "BAD,1,0.4,12,5,1,,,2,poisson:mean=9,,,\n"},
		{"batch-current-s-over-S", "BAD,1,0.4,12,5,1,,,,poisson:mean=9,30,20,\n"},
	} {
		add(hostileCase{
			name:  c.name,
			args:  []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv"},
			files: map[string]string{"items.csv": itemsHeader + goodItem + c.row + goodItem[:4] + "2" + goodItem[4:]},
			code:  3,
		})
	}
	// The review_period column (issue 12): bad cells fail their row alone;
	// lost sales reviewed weekly are planned.
	const reviewHeader = "sku,lead_time,holding_cost,shortage_cost,unmet,demand,review_period\n"
	for _, c := range []struct{ name, row string }{
		{"batch-review-period-0", "BAD,1,0.4,12,,poisson:mean=9,0\n"},
		{"batch-review-period-frac", "BAD,1,0.4,12,,poisson:mean=9,1.5\n"},
		{"batch-review-period-word", "BAD,1,0.4,12,,poisson:mean=9,weekly\n"},
		{"batch-review-period-huge", "BAD,1,0.4,12,,poisson:mean=9,1e15\n"},
		{"batch-review-period-lost-huge-lead", "BAD,1000000000,0.4,12,lost,poisson:mean=9,7\n"},
	} {
		add(hostileCase{
			name:  c.name,
			args:  []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv"},
			files: map[string]string{"items.csv": reviewHeader + "GOOD,1,0.4,12,lost,poisson:mean=2,7\n" + c.row + "GOOD2,3,0.4,12,,poisson:mean=9,7\n"},
			code:  3,
		})
	}
	for _, c := range []struct {
		name  string
		files map[string]string
		args  []string
		code  int
		want  []string
	}{
		{"batch-items-missing", nil, []string{"--items", "{dir}/none.csv", "--out", "{dir}/out.csv"}, 1, []string{"none.csv"}},
		{"batch-items-semicolon", map[string]string{"items.csv": "sku;lead_time;holding_cost;shortage_cost\nA;1;0.4;12\n"}, []string{"--items", "{dir}/items.csv", "--out", "{dir}/out.csv", "--delimiter", ","}, 1, []string{"items.csv", ";"}},
		{"batch-out-dir-missing", map[string]string{"items.csv": itemsHeader + goodItem}, []string{"--items", "{dir}/items.csv", "--out", "{dir}/no/such/out.csv"}, 1, []string{"out.csv"}},
		{"batch-out-is-dir", map[string]string{"items.csv": itemsHeader + goodItem}, []string{"--items", "{dir}/items.csv", "--out", "{dir}"}, 1, []string{"--out"}},
		{"batch-shard-bad", map[string]string{"items.csv": itemsHeader + goodItem}, []string{"--items", "{dir}/items.csv", "--out", "{dir}/out.csv", "--shard", "3/2"}, 2, []string{"--shard"}},
		{"batch-workers-neg", map[string]string{"items.csv": itemsHeader + goodItem}, []string{"--items", "{dir}/items.csv", "--out", "{dir}/out.csv", "--workers", "-1"}, 2, []string{"--workers"}},
		{"batch-period-bad", map[string]string{"items.csv": itemsHeader + goodItem}, []string{"--items", "{dir}/items.csv", "--out", "{dir}/out.csv", "--period", "year"}, 2, []string{"--period"}},
		{"batch-items-empty", map[string]string{"items.csv": ""}, []string{"--items", "{dir}/items.csv", "--out", "{dir}/out.csv"}, 1, []string{"items.csv"}},
		{"batch-history-missing", map[string]string{"items.csv": itemsHeader + goodItem}, []string{"--items", "{dir}/items.csv", "--history", "{dir}/none.csv", "--out", "{dir}/out.csv"}, 1, []string{"none.csv"}},
	} {
		add(hostileCase{name: c.name, files: c.files, args: append([]string{"batch"}, c.args...), code: c.code, names: c.want})
	}

	// The reader flags of issue 11 (fit, batch and report share them):
	// values of the wrong kind are usage errors naming the flag; files
	// that cannot be read as asked are one-line refusals naming the file.
	rhist := "sku,date,quantity\nA,2025-01-06,3\nA,2025-01-13,4\nA,2025-01-20,2\nA,2025-01-27,5\n"
	for _, cmd := range []string{"fit", "batch"} {
		base := []string{cmd, "--history", "{dir}/h.csv"}
		if cmd == "batch" {
			base = append(base, "--items", "{dir}/items.csv", "--out", "{dir}/out.csv")
		}
		files := map[string]string{"h.csv": rhist, "items.csv": "sku,lead_time,holding_cost,shortage_cost\nA,1,0.4,12\n"}
		for _, c := range []struct{ flag, value string }{
			{"--delimiter", "::"}, {"--delimiter", "\""}, {"--delimiter", ""}, {"--decimal", ";"}, {"--decimal", "komma"},
			{"--date-format", "DD-MM-YY"}, {"--date-format", "julian"}, {"--returns", "keep"}, {"--returns-column", "type"},
			{"--returns-column", "=RETURN"}, {"--quantity-scale", "0"}, {"--quantity-scale", "-10"}, {"--quantity-scale", "NaN"},
			{"--quantity-scale", "1e400"}, {"--quantity-scale", "ten"}, {"--history-columns", "sku"}, {"--history-columns", "colour=Farbe"},
			{"--history-columns", "sku=A,sku=B"}, {"--history-columns", "=Qty"},
		} {
			code := 2
			if c.flag == "--delimiter" && c.value == "" {
				code = 0 // "" is auto
			}
			add(hostileCase{name: fmt.Sprintf("%s%s=%q", cmd, c.flag, c.value), args: append(append([]string(nil), base...), c.flag, c.value), files: files, code: code, names: []string{c.flag}})
		}
		for _, c := range []struct {
			name, body string
			extra      []string
			code       int
			want       []string
		}{
			{"mixed-dates", "sku,date,quantity\nA,2025-01-06,3\nA,13.01.2025,4\n", nil, 1, []string{"h.csv", "line 2", "line 3", "--date-format"}},
			{"ambiguous-dates", "sku,date,quantity\nA,06/01/2025,3\nA,07/01/2025,4\n", nil, 1, []string{"h.csv", "--date-format"}},
			{"date-format-wrong", rhist, []string{"--date-format", "DD.MM.YYYY"}, 1, []string{"h.csv"}},
			{"map-to-absent", rhist, []string{"--history-columns", "quantity=Qty"}, 1, []string{"h.csv", "Qty"}},
			{"near-miss", "sku,date,quantiy\nA,2025-01-06,3\n", nil, 1, []string{"h.csv", "quantiy", "quantity"}},
			{"returns-column-absent", rhist, []string{"--returns-column", "type=RETURN"}, 1, []string{"h.csv", "type"}},
			{"monthly-as-weeks", "sku,date,quantity\nA,2025-01-01,30\nA,2025-02-01,40\nA,2025-03-01,20\nA,2025-04-01,50\n", nil, 1, []string{"h.csv", "--period month"}},
			{"utf16-garbage", "\xff\xfe\x00\xd8\x00\xd8", nil, 1, []string{"h.csv"}},
			{"xlsx-not-a-workbook", "PK\x03\x04garbage", nil, 1, []string{"h.csv"}},
			{"encoding-unknown", rhist, []string{"--encoding", "klingon"}, 1, []string{"klingon"}},
			{"sheet-absent", rhist, []string{"--history-sheet", "Sales"}, 0, nil},
			{"all-returns", "sku,date,quantity\nA,2025-01-06,-3\nA,2025-01-13,-4\n", nil, 1, []string{"h.csv"}},
			{"decimal-contradiction", "sku;date;quantity\nA;2025-01-06;1,5\nA;2025-01-13;2.5\n", []string{"--quantity-scale", "10"}, 0, nil},
		} {
			code := c.code
			if cmd == "batch" && c.name == "decimal-contradiction" {
				code = 3 // the SKU with a bad row fails
			}
			f := map[string]string{"h.csv": c.body, "items.csv": files["items.csv"]}
			add(hostileCase{name: cmd + "-" + c.name, args: append(append([]string(nil), base...), c.extra...), files: f, code: code, names: c.want})
		}
	}
	// Items cells from a spreadsheet: each bad one fails its item alone.
	for _, c := range []struct{ name, row string }{
		{"batch-fill-rate-100pct", "BAD,1,0.4,12,5,1,,,100%,poisson:mean=9,,,\n"},
		{"batch-fill-rate-pct-text", "BAD,1,0.4,12,5,1,,,ninety%,poisson:mean=9,,,\n"},
		{"batch-cost-currency-only", "BAD,1,€,12,5,1,,,,poisson:mean=9,,,\n"},
		{"batch-cost-unknown-currency", "BAD,1,12 XYZ,12,5,1,,,,poisson:mean=9,,,\n"},
	} {
		add(hostileCase{
			name:  c.name,
			args:  []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv"},
			files: map[string]string{"items.csv": itemsHeader + goodItem + c.row + goodItem[:4] + "2" + goodItem[4:]},
			code:  3,
		})
	}
	add(hostileCase{name: "batch-mixed-currencies", args: []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv"},
		files: map[string]string{"items.csv": "sku,lead_time,holding_cost,shortage_cost,demand\nA,1,€0.4,12,poisson:mean=9\nB,1,$0.4,12,poisson:mean=9\n"}, code: 1, names: []string{"items.csv", "EUR"}})
	add(hostileCase{name: "batch-items-location-history-without", args: []string{"batch", "--items", "{dir}/items.csv", "--history", "{dir}/h.csv", "--out", "{dir}/out.csv"},
		files: map[string]string{"items.csv": "sku,location,lead_time,holding_cost,shortage_cost\nA,north,1,0.4,12\n", "h.csv": rhist}, code: 1, names: []string{"h.csv", "location"}})
	add(hostileCase{name: "batch-decisions-by-sku-run-by-location", args: []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv", "--decisions", "{dir}/d.csv"},
		files: map[string]string{"items.csv": "sku,location,lead_time,holding_cost,shortage_cost,demand\nA,north,1,0.4,12,poisson:mean=3\n",
			"d.csv": strings.Join(batch.DecisionHeader(), ",") + "\nA,1,keep,base-stock,,3,,,\n"}, code: 1, names: []string{"d.csv:2", "location"}})
	add(hostileCase{name: "batch-decisions-location-run-by-sku", args: []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv", "--decisions", "{dir}/d.csv"},
		files: map[string]string{"items.csv": "sku,lead_time,holding_cost,shortage_cost,demand\nA,1,0.4,12,poisson:mean=3\n",
			"d.csv": strings.Join(batch.DecisionHeaderLocation(), ",") + "\nA,north,1,keep,base-stock,,3,,,\n"}, code: 1, names: []string{"d.csv:2", "location"}})
	add(hostileCase{name: "batch-demand-decimal-comma-ambiguous", args: []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv"},
		files: map[string]string{"items.csv": "sku;lead_time;holding_cost;shortage_cost;demand\nA;1;1;9;poisson:mean=1,500\nB;1;1;9;negbin:mean=2,5,var=9,75\n"}, code: 3})
	add(hostileCase{name: "batch-lead-time-days-huge", args: []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv"},
		files: map[string]string{"items.csv": "sku,lead_time_days,holding_cost,shortage_cost,demand\nA,1e300,0.4,12,poisson:mean=9\nB,3,0.4,12,poisson:mean=9\n"}, code: 3})
	// Lead-time laws in the items file, the lead_time_model column and the
	// batch defaults --review-period and --lead-time-model (issue 12): a
	// bad flag is a usage error naming it; a bad cell fails its item alone
	// (exit 3), whatever the law, without crashing or running away.
	lawItems := "sku,lead_time,holding_cost,shortage_cost,order_cost,demand,lead_time_model\n" +
		"OK,\"pmf:1=0.2,2=0.5,3=0.3\",0.4,12,0,poisson:mean=9,\n" +
		"KAPLAN,\"pmf:2=0.2,3=0.5,5=0.3\",0.4,12,0,poisson:mean=9,\n" +
		"WIDE,poisson:mean=1e6,0.4,12,0,poisson:mean=9,\n" +
		"HUGE,pmf:1048577=1,0.4,12,0,poisson:mean=9,\n" +
		"NAN,poisson:mean=NaN,0.4,12,0,poisson:mean=9,\n" +
		"EMPTY,pmf:,0.4,12,0,poisson:mean=9,\n" +
		"SUM,pmf:1=0.5,0.4,12,0,poisson:mean=9,\n" +
		"HEAVY,\"negbin:mean=40,var=4000\",0.4,12,0,poisson:mean=9,independent\n" +
		"CROSS,\"pmf:1=0.5,3=0.5\",0.4,12,20,poisson:mean=9,independent\n" +
		"MODEL,2,0.4,12,0,poisson:mean=9,crossing\n"
	lawBatch := func(extra ...string) []string {
		return append([]string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv"}, extra...)
	}
	add(hostileCase{name: "batch-items-laws", args: lawBatch(), files: map[string]string{"items.csv": lawItems}, code: 3})
	add(hostileCase{name: "batch-items-laws-weekly", args: lawBatch("--review-period", "7", "--lead-time-model", "independent"), files: map[string]string{"items.csv": lawItems}, code: 3})
	add(hostileCase{name: "batch-items-law-semicolon", args: lawBatch(), code: 0,
		files: map[string]string{"items.csv": "sku;lead_time;holding_cost;shortage_cost;demand\nA;pmf:1=0.2,2=0.5,3=0.3;0,4;12;poisson:mean=9\n"}})
	for _, v := range []string{"-1", "0", "1.5", "abc", "100001", "9223372036854775808", ""} {
		add(hostileCase{name: fmt.Sprintf("batch--review-period=%q", v), args: lawBatch("--review-period", v),
			files: map[string]string{"items.csv": lawItems}, code: 2, names: []string{"--review-period", v}})
	}
	for _, v := range []string{"crossing", "FIFO", "sequential,independent"} {
		add(hostileCase{name: fmt.Sprintf("batch--lead-time-model=%q", v), args: lawBatch("--lead-time-model", v),
			files: map[string]string{"items.csv": lawItems}, code: 2, names: []string{"--lead-time-model"}})
	}
	// The results' output flags and --carry (issue 11).
	outItems := map[string]string{"items.csv": itemsHeader + goodItem}
	batchOut := func(extra ...string) []string {
		return append([]string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv"}, extra...)
	}
	for _, c := range []struct {
		name string
		args []string
		code int
		want []string
	}{
		{"batch-out-delimiter-pipe", batchOut("--out-delimiter", "|"), 2, []string{"--out-delimiter"}},
		{"batch-out-delimiter-two", batchOut("--out-delimiter", ";;"), 2, []string{"--out-delimiter"}},
		{"batch-out-delimiter-quote", batchOut("--out-delimiter", `"`), 2, []string{"--out-delimiter"}},
		{"batch-out-delimiter-empty", batchOut("--out-delimiter", ""), 2, []string{"--out-delimiter"}},
		{"batch-out-decimal-comma-comma", batchOut("--out-decimal", ","), 2, []string{"--out-delimiter", "--out-decimal"}},
		{"batch-out-decimal-x", batchOut("--out-decimal", "x"), 2, []string{"--out-decimal"}},
		{"batch-digits-neg", batchOut("--digits", "-1"), 2, []string{"--digits"}},
		{"batch-digits-18", batchOut("--digits", "18"), 2, []string{"--digits"}},
		{"batch-digits-huge", batchOut("--digits", "1e300"), 2, []string{"--digits"}},
		{"batch-digits-word", batchOut("--digits", "all"), 2, []string{"--digits"}},
		{"batch-xlsx-with-delimiter", []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.xlsx", "--out-delimiter", ";"}, 2, []string{"--out-delimiter", "out.xlsx"}},
		{"batch-xlsx-dir-missing", []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/no/out.xlsx"}, 1, []string{"out.xlsx"}},
		{"batch-xlsx-upper-case", []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/OUT.XLSX", "--digits", "4"}, 0, nil},
		{"batch-semicolon-comma-digits", batchOut("--out-delimiter", "semicolon", "--out-decimal", "comma", "--digits", "1"), 0, nil},
		{"batch-carry-empty", batchOut("--carry", ""), 2, []string{"--carry"}},
		{"batch-carry-commas", batchOut("--carry", ",,,"), 2, []string{"--carry"}},
		{"batch-carry-unknown", batchOut("--carry", "vendor"), 2, []string{"--carry vendor", "items.csv", `"sku"`}},
		{"batch-carry-results-column", batchOut("--carry", "sku"), 2, []string{"--carry sku"}},
		{"batch-carry-twice", batchOut("--carry", "unmet,UNMET"), 2, []string{"--carry", "twice"}},
		{"batch-carry-long", batchOut("--carry", strings.Repeat("x", 100000)), 2, []string{"--carry"}},
		{"batch-carry-known", batchOut("--carry", "unmet,min_fill_rate"), 0, nil},
	} {
		add(hostileCase{name: c.name, files: outItems, args: c.args, code: c.code, names: c.want})
	}

	// merge on parts that are not one run's.
	part := func(k, n int, run string, rows ...string) string {
		m := batch.Meta{Format: batch.MetaFormat, Period: "week", Items: "0123456789abcdef", History: "none", Shard: batch.Shard{K: k, N: n}, Version: "t"}
		m.Run = run
		return m.String() + "\n" + strings.Join(batch.Header(), ",") + "\n" + strings.Join(rows, "")
	}
	row := func(item string) string { // a failed item's row
		cells := make([]string, len(batch.Header()))
		for i, h := range batch.Header() {
			switch h {
			case "sku":
				cells[i] = "A" + item
			case "error":
				cells[i] = "not planned"
			case "item":
				cells[i] = item
			}
		}
		return strings.Join(cells, ",") + "\n"
	}
	// serve and batch --decisions: every refusal comes before the server
	// listens.
	results := strings.Join(batch.Header(), ",") + "\n"
	for i, h := range batch.Header() { // one failed row for GOOD
		if i > 0 {
			results += ","
		}
		switch h {
		case "sku":
			results += "GOOD"
		case "error":
			results += "failed on purpose"
		}
	}
	results += "\n"
	decHeader := strings.Join(batch.DecisionHeader(), ",") + "\n"
	serveFiles := map[string]string{"items.csv": itemsHeader + goodItem, "r.csv": results}
	withFiles := func(extra map[string]string) map[string]string {
		m := map[string]string{}
		for k, v := range serveFiles {
			m[k] = v
		}
		for k, v := range extra {
			m[k] = v
		}
		return m
	}
	serveArgs := []string{"--results", "{dir}/r.csv", "--items", "{dir}/items.csv", "--addr", "127.0.0.1:0"}
	// Receipts for fit and batch (issue 12): refusals name the file and
	// line or the flag; a file with some usable rows plans (exit 0 or 3).
	const okReceipts = "sku,supplier,order_date,receipt_date\nA,S,2025-03-03,2025-03-12\nA,S,2025-03-10,2025-03-24\n"
	for _, c := range []struct {
		name, body string
		extra      []string
		code       int
		want       []string
	}{
		{"receipts-empty", "", nil, 1, []string{"r.csv"}},
		{"receipts-header-only", "sku,order_date,receipt_date\n", nil, 1, []string{"r.csv", "no data rows"}},
		{"receipts-binary", "\x00\x01\x02\xff\xfe", nil, 1, []string{"r.csv"}},
		{"receipts-missing-column", "sku,order_date\nA,2025-03-03\n", nil, 1, []string{"r.csv:1", "receipt_date"}},
		{"receipts-misspelt-column", "sku,order_date,recieved_date\nA,2025-03-03,2025-03-12\n", nil, 1, []string{"r.csv:1", "recieved_date", "receipt_date"}},
		{"receipts-before-order", "sku,order_date,receipt_date\nA,2025-03-10,2025-03-03\n", nil, 1, []string{"r.csv:2", "receipt_date", "before"}},
		{"receipts-year-typo", "sku,order_date,receipt_date\nA,2025-03-10,2205-03-13\n", nil, 1, []string{"r.csv:2", "receipt_date"}},
		{"receipts-ten-years", "sku,order_date,receipt_date\nA,1990-03-10,2025-03-13\n", nil, 1, []string{"r.csv:2", "3653 days"}},
		{"receipts-ambiguous-dates", "sku,order_date,receipt_date\nA,03/04/2025,05/04/2025\n", nil, 1, []string{"r.csv", "--receipts-date-format"}},
		{"receipts-mixed-dates", "sku,order_date,receipt_date\nA,2025-03-04,05.04.2025\nA,31/03/2025,04/30/2025\n", nil, 1, []string{"r.csv", "--receipts-date-format"}},
		{"receipts-quantity-negative", "sku,order_date,receipt_date,quantity\nA,2025-03-03,2025-03-12,-5\n", nil, 1, []string{"r.csv:2", "quantity"}},
		{"receipts-quantity-nan", "sku,order_date,receipt_date,quantity\nA,2025-03-03,2025-03-12,NaN\n", nil, 1, []string{"r.csv:2", "quantity"}},
		{"receipts-short-row", "sku,order_date,receipt_date\nA,2025-03-03\n", nil, 1, []string{"r.csv:2"}},
		{"receipts-wrong-layout-given", okReceipts, []string{"--receipts-date-format", "DD.MM.YYYY"}, 1, []string{"r.csv:2", "DD.MM.YYYY"}},
		{"receipts-layout-bad", okReceipts, []string{"--receipts-date-format", "YY-MM"}, 2, []string{"--receipts-date-format", "YY-MM"}},
		{"receipts-columns-bad", okReceipts, []string{"--receipts-columns", "sku"}, 2, []string{"--receipts-columns"}},
		{"receipts-columns-unknown", okReceipts, []string{"--receipts-columns", "vendor=Supplier"}, 2, []string{"--receipts-columns", "vendor"}},
		{"receipts-columns-absent", okReceipts, []string{"--receipts-columns", "order_date=PO Date"}, 1, []string{"r.csv:1", "PO Date"}},
		{"receipts-with-history", okReceipts, []string{"--history", "{dir}/r.csv"}, 2, []string{"--history", "--receipts"}},
		{"receipts-json-and-out", okReceipts, []string{"--json", "--out", "{dir}/o.csv"}, 2, []string{"--json", "--out"}},
		{"receipts-one-bad-sku", okReceipts + "B,S,2025-03-10,2025-03-03\n", nil, 3, nil},
		{"receipts-ok", okReceipts, nil, 0, nil},
		{"receipts-out", okReceipts, []string{"--out", "{dir}/o.csv"}, 0, nil},
		{"receipts-daily-ten-years", "sku,order_date,receipt_date\nA,2015-03-10,2025-03-09\nA,2015-03-10,2015-03-10\nA,2015-03-11,2015-03-12\n", []string{"--period", "day"}, 0, nil},
		{"receipts-utf16", "\xff\xfes\x00k\x00u\x00,\x00o\x00r\x00d\x00e\x00r\x00_\x00d\x00a\x00t\x00e\x00,\x00r\x00e\x00c\x00e\x00i\x00p\x00t\x00_\x00d\x00a\x00t\x00e\x00\n\x00A\x00,\x002\x000\x002\x005\x00-\x000\x003\x00-\x000\x003\x00,\x002\x000\x002\x005\x00-\x000\x003\x00-\x001\x002\x00\n\x00", nil, 0, nil},
	} {
		add(hostileCase{name: "fit-" + c.name, args: append([]string{"fit", "--receipts", "{dir}/r.csv"}, c.extra...), files: map[string]string{"r.csv": c.body}, code: c.code, names: c.want})
	}
	add(hostileCase{name: "fit-receipts-missing-file", args: []string{"fit", "--receipts", "{dir}/none.csv"}, code: 1, names: []string{"--receipts", "none.csv"}})
	for _, c := range []struct {
		name  string
		files map[string]string
		args  []string
		code  int
		want  []string
	}{
		{"merge-no-parts", nil, []string{"--out", "{dir}/m.csv"}, 2, []string{"no parts"}},
		{"merge-no-out", map[string]string{"p.csv": part(0, 1, "r", row("0"))}, []string{"{dir}/p.csv"}, 2, []string{"--out"}},
		{"merge-part-missing", nil, []string{"--out", "{dir}/m.csv", "{dir}/none.csv"}, 1, []string{"none.csv"}},
		{"merge-part-empty", map[string]string{"p.csv": ""}, []string{"--out", "{dir}/m.csv", "{dir}/p.csv"}, 1, []string{"p.csv"}},
		{"merge-part-foreign", map[string]string{"p.csv": "a,b\n1,2\n"}, []string{"--out", "{dir}/m.csv", "{dir}/p.csv"}, 1, []string{"p.csv:1", "header record"}},
		{"merge-part-binary", map[string]string{"p.csv": "\x00\xff\xfe\x01garbage"}, []string{"--out", "{dir}/m.csv", "{dir}/p.csv"}, 1, []string{"p.csv"}},
		{"merge-part-workbook", map[string]string{"p.xlsx": "PK\x03\x04junk"}, []string{"--out", "{dir}/m.csv", "{dir}/p.xlsx"}, 1, []string{"p.xlsx", "workbook"}},
		{"merge-part-newer", map[string]string{"p.csv": "# ergostock results v9; period=week; items=x\n"}, []string{"--out", "{dir}/m.csv", "{dir}/p.csv"}, 1, []string{"p.csv:1", "v9"}},
		{"merge-digest-mismatch", map[string]string{"a.csv": part(0, 2, "aaaa", row("0")), "b.csv": part(1, 2, "bbbb", row("1"))},
			[]string{"--out", "{dir}/m.csv", "{dir}/a.csv", "{dir}/b.csv"}, 1, []string{"b.csv:1", "run digest bbbb", "aaaa"}},
		{"merge-shard-missing", map[string]string{"a.csv": part(0, 3, "r", row("0")), "b.csv": part(1, 3, "r", row("1"))},
			[]string{"--out", "{dir}/m.csv", "{dir}/a.csv", "{dir}/b.csv"}, 1, []string{"shard 2/3 is missing"}},
		{"merge-duplicate", map[string]string{"a.csv": part(0, 1, "r", row("0"), row("0"))},
			[]string{"--out", "{dir}/m.csv", "{dir}/a.csv"}, 1, []string{"a.csv:4", "item 0"}},
		{"merge-gap", map[string]string{"a.csv": part(0, 1, "r", row("0"), row("2"))},
			[]string{"--out", "{dir}/m.csv", "{dir}/a.csv"}, 1, []string{"a.csv", "item 1"}},
		{"merge-item-huge", map[string]string{"a.csv": part(0, 1, "r", row("99999999999999999999999"))},
			[]string{"--out", "{dir}/m.csv", "{dir}/a.csv"}, 1, []string{"a.csv:3", "item"}},
		{"merge-item-negative", map[string]string{"a.csv": part(0, 1, "r", row("-1"))},
			[]string{"--out", "{dir}/m.csv", "{dir}/a.csv"}, 1, []string{"a.csv:3", "item"}},
		{"merge-out-is-part", map[string]string{"a.csv": part(0, 1, "r", row("0"))}, []string{"--out", "{dir}/a.csv", "{dir}/a.csv"}, 2, []string{"--out", "a.csv"}},
		{"merge-out-xlsx", map[string]string{"a.csv": part(0, 1, "r", row("0"))}, []string{"--out", "{dir}/m.xlsx", "{dir}/a.csv"}, 2, []string{"--out", "m.xlsx"}},
		{"merge-out-dir-missing", map[string]string{"a.csv": part(0, 1, "r", row("0"))}, []string{"--out", "{dir}/no/m.csv", "{dir}/a.csv"}, 1, []string{"m.csv"}},
		{"merge-ok", map[string]string{"a.csv": part(0, 2, "r", row("0"), row("2")), "b.csv": part(1, 2, "r", row("1"))},
			[]string{"--out", "{dir}/m.csv", "{dir}/b.csv", "{dir}/a.csv"}, 0, nil},
	} {
		add(hostileCase{name: c.name, files: c.files, args: append([]string{"merge"}, c.args...), code: c.code, names: c.want})
	}
	for _, c := range []struct {
		name  string
		files map[string]string
		args  []string
		code  int
		want  []string
	}{
		{"serve-addr-remote", serveFiles, []string{"--results", "{dir}/r.csv", "--items", "{dir}/items.csv", "--addr", "0.0.0.0:0"}, 2, []string{"--addr", "--allow-remote"}},
		{"serve-addr-bad", serveFiles, []string{"--results", "{dir}/r.csv", "--items", "{dir}/items.csv", "--addr", "8080"}, 2, []string{"--addr 8080"}},
		{"serve-timeout-0", serveFiles, append(append([]string(nil), serveArgs...), "--timeout", "0s"), 2, []string{"--timeout"}},
		{"serve-results-missing", serveFiles, []string{"--results", "{dir}/none.csv", "--items", "{dir}/items.csv", "--addr", "127.0.0.1:0"}, 1, []string{"none.csv"}},
		{"serve-results-foreign", withFiles(map[string]string{"r.csv": "a,b\n1,2\n"}), serveArgs, 1, []string{"r.csv"}},
		{"serve-items-missing", serveFiles, []string{"--results", "{dir}/r.csv", "--items", "{dir}/none.csv", "--addr", "127.0.0.1:0"}, 1, []string{"none.csv"}},
		{"serve-decisions-same", serveFiles, append(append([]string(nil), serveArgs...), "--decisions", "{dir}/items.csv"), 2, []string{"--decisions"}},
		{"serve-decisions-foreign", withFiles(map[string]string{"d.csv": "when,what\n1,2\n"}), append(append([]string(nil), serveArgs...), "--decisions", "{dir}/d.csv"), 1, []string{"d.csv:1"}},
		{"serve-decisions-version-gap", withFiles(map[string]string{"d.csv": decHeader + "GOOD,2,keep,base-stock,,20,,,\n"}), append(append([]string(nil), serveArgs...), "--decisions", "{dir}/d.csv"), 1, []string{"d.csv:2", "version"}},
		{"serve-nothing", nil, []string{}, 2, []string{"--results"}},
		// serve takes the reader flags of batch (issue 11 downstream) and
		// keys a run by (sku, location) as batch planned it.
		{"serve-returns-bad", serveFiles, append(append([]string(nil), serveArgs...), "--returns", "sometimes"), 2, []string{"--returns"}},
		{"serve-delimiter-bad", serveFiles, append(append([]string(nil), serveArgs...), "--delimiter", "xx"), 2, []string{"--delimiter"}},
		{"serve-history-columns-unknown", withFiles(map[string]string{"h.csv": rhist}), append(append([]string(nil), serveArgs...), "--history", "{dir}/h.csv", "--history-columns", "location=Site"), 1, []string{"h.csv", "Site"}},
		{"serve-items-location-results-without", withFiles(map[string]string{"items.csv": "sku,location,lead_time,holding_cost,shortage_cost\nGOOD,north,1,0.4,12\n"}), serveArgs, 1, []string{"items.csv:1", "location"}},
	} {
		add(hostileCase{name: c.name, files: c.files, args: append([]string{"serve"}, c.args...), code: c.code, names: c.want})
	}
	for _, c := range []struct {
		name, decisions string
		want            []string
	}{
		{"batch-decisions-policy-bad", decHeader + "GOOD,1,override,s-S,30,20,,,\n", []string{"GOOD", "reorder point 30"}},
		{"batch-decisions-kind-bad", decHeader + "GOOD,1,maybe,base-stock,,20,,,\n", []string{"d.csv:2", "decision"}},
		{"batch-decisions-level-bad", decHeader + "GOOD,1,keep,base-stock,,2.5,,,\n", []string{"d.csv:2", "order_up_to"}},
		{"batch-decisions-time-bad", decHeader + "GOOD,1,keep,base-stock,,20,,,yesterday\n", []string{"d.csv:2", "decided_at"}},
	} {
		code := 1
		if c.name == "batch-decisions-policy-bad" {
			code = 3 // the item fails, the run goes on
		}
		add(hostileCase{name: c.name, files: map[string]string{"items.csv": itemsHeader + goodItem, "d.csv": c.decisions},
			args: []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv", "--decisions", "{dir}/d.csv"}, code: code, names: c.want})
	}
	add(hostileCase{name: "batch-decisions-missing", files: map[string]string{"items.csv": itemsHeader + goodItem},
		args: []string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv", "--decisions", "{dir}/none.csv"}, code: 1, names: []string{"--decisions", "none.csv"}})

	for _, c := range []struct {
		name  string
		files map[string]string
		args  []string
		code  int
		want  []string
	}{
		{"batch-receipts-missing", map[string]string{"items.csv": itemsHeader + goodItem}, []string{"--receipts", "{dir}/none.csv"}, 1, []string{"--receipts", "none.csv"}},
		{"batch-receipts-stdin", map[string]string{"items.csv": itemsHeader + goodItem}, []string{"--receipts", "-"}, 2, []string{"--receipts"}},
		{"batch-receipts-empty-flag", map[string]string{"items.csv": itemsHeader + goodItem}, []string{"--receipts", ""}, 2, []string{"--receipts"}},
		{"batch-receipts-is-out", map[string]string{"items.csv": itemsHeader + goodItem, "out.csv": okReceipts}, []string{"--receipts", "{dir}/out.csv"}, 2, []string{"--out", "--receipts"}},
		{"batch-receipts-no-usable-row", map[string]string{"items.csv": itemsHeader + goodItem, "r.csv": "sku,order_date,receipt_date\nGOOD,2025-03-10,2025-03-03\n"}, []string{"--receipts", "{dir}/r.csv"}, 1, []string{"r.csv:2", "receipt_date"}},
		{"batch-receipts-layout-bad", map[string]string{"items.csv": itemsHeader + goodItem, "r.csv": okReceipts}, []string{"--receipts", "{dir}/r.csv", "--receipts-date-format", "julian"}, 2, []string{"--receipts-date-format"}},
		{"batch-receipts-ok", map[string]string{"items.csv": itemsHeader + goodItem + "A,2,0.4,12,0,1,,,,poisson:mean=3,,,\n", "r.csv": okReceipts}, []string{"--receipts", "{dir}/r.csv"}, 0, nil},
	} {
		args := append([]string{"batch", "--items", "{dir}/items.csv", "--out", "{dir}/out.csv"}, c.args...)
		add(hostileCase{name: c.name, files: c.files, args: args, code: c.code, names: c.want})
	}

	// Report on inputs that are not what it needs.
	for _, c := range []struct {
		name  string
		files map[string]string
		args  []string
		code  int
		want  []string
	}{
		{"report-results-missing", nil, []string{"--results", "{dir}/none.csv", "--out", "{dir}/r.html"}, 1, []string{"none.csv"}},
		{"report-results-foreign", map[string]string{"r.csv": "a,b,c\n1,2,3\n"}, []string{"--results", "{dir}/r.csv", "--out", "{dir}/r.html"}, 1, []string{"r.csv"}},
		{"report-sku-unknown", map[string]string{"h.csv": okHistory}, []string{"--history", "{dir}/h.csv", "--sku", "NOPE", "--holding-cost", "1", "--shortage-cost", "9", "--out", "{dir}/r.html"}, 1, []string{"NOPE"}},
		{"report-sku-S-2e9", map[string]string{"h.csv": okHistory}, []string{"--history", "{dir}/h.csv", "--sku", "A", "--holding-cost", "1", "--shortage-cost", "9", "--order-up-to", "2000000000", "--out", "{dir}/r.html"}, 1, []string{"--order-up-to"}},
		{"report-sku-L-1e6-lost", map[string]string{"h.csv": okHistory}, []string{"--history", "{dir}/h.csv", "--sku", "A", "--holding-cost", "1", "--shortage-cost", "9", "--unmet", "lost", "--lead-time", "1000000", "--out", "{dir}/r.html"}, 1, []string{"--lead-time"}},
		{"report-nothing", nil, []string{"--out", "{dir}/r.html"}, 2, nil},
		{"report-location-without-sku", map[string]string{"h.csv": okHistory}, []string{"--history", "{dir}/h.csv", "--location", "north", "--holding-cost", "1", "--shortage-cost", "9", "--out", "{dir}/r.html"}, 2, []string{"--location"}},
		{"report-location-no-column", map[string]string{"h.csv": okHistory}, []string{"--history", "{dir}/h.csv", "--sku", "A", "--location", "north", "--holding-cost", "1", "--shortage-cost", "9", "--out", "{dir}/r.html"}, 1, []string{"h.csv:1", "--location"}},
		{"report-location-on-batch-page", map[string]string{"r.csv": "x\n"}, []string{"--results", "{dir}/r.csv", "--location", "north", "--out", "{dir}/r.html"}, 2, []string{"--location"}},
		{"report-results-workbook-junk", map[string]string{"r.xlsx": "PK\x03\x04junk"}, []string{"--results", "{dir}/r.xlsx", "--out", "{dir}/r.html"}, 1, []string{"r.xlsx"}},
		{"report-results-workbook-empty", map[string]string{"r.xlsx": ""}, []string{"--results", "{dir}/r.xlsx", "--out", "{dir}/r.html"}, 1, []string{"r.xlsx"}},
		{"report-results-semicolon-foreign", map[string]string{"r.csv": "\ufeff# ergostock results v2; period=week; items=x; decimal=comma\nsku;demand\nA;1,5\n"}, []string{"--results", "{dir}/r.csv", "--out", "{dir}/r.html"}, 1, []string{"r.csv:2", "missing columns"}},
		{"report-results-decimal-contradiction", map[string]string{"r.csv": "# ergostock results v2; period=week; items=x\n" + strings.Join(batch.Header(), ";") + "\nA;poisson:mean=1;1,5" + strings.Repeat(";", len(batch.Header())-3) + "\n"}, []string{"--results", "{dir}/r.csv", "--out", "{dir}/r.html"}, 1, []string{"r.csv:3", "demand_mean"}},
		// Issue 12: a lead-time law, the models and a review period on the page, simulated too.
		{"report-law-review-simulate", map[string]string{"h.csv": okHistory}, []string{"--history", "{dir}/h.csv", "--sku", "A", "--holding-cost", "1", "--shortage-cost", "9", "--lead-time", "pmf:1=0.2,2=0.5,3=0.3", "--review-period", "7", "--simulate", "--periods", "3000", "--replications", "3", "--out", "{dir}/r.html"}, 0, nil},
		{"report-independent-base-stock", nil, []string{"--demand", "poisson:mean=4", "--holding-cost", "1", "--shortage-cost", "9", "--lead-time", "pmf:0=0.2,1=0.3,4=0.5", "--lead-time-model", "independent", "--policy", "base-stock", "--simulate", "--periods", "3000", "--replications", "3", "--out", "{dir}/r.html"}, 0, nil},
		{"report-kaplan-refused", nil, []string{"--demand", "poisson:mean=4", "--holding-cost", "1", "--shortage-cost", "9", "--lead-time", "pmf:2=0.2,3=0.5,5=0.3", "--out", "{dir}/r.html"}, 2, []string{"--lead-time", "hazard"}},
	} {
		add(hostileCase{name: c.name, files: c.files, args: append([]string{"report"}, c.args...), code: c.code, names: c.want})
	}

	// The command line itself.
	add(hostileCase{name: "unknown-command", args: []string{"frobnicate"}, code: 2, names: []string{"frobnicate"}})
	add(hostileCase{name: "stray-argument", args: append(sys("evaluate", "--order-up-to", "20"), "extra"), code: 2, names: []string{"extra"}})
	add(hostileCase{name: "unknown-flag", args: sys("evaluate", "--order-up-to", "20", "--colour", "red"), code: 2, names: []string{"colour"}})
	add(hostileCase{name: "unmet-bad", args: sys("evaluate", "--order-up-to", "20", "--unmet", "sometimes"), code: 2, names: []string{"--unmet"}})
	add(hostileCase{name: "optimize-policy-bad", args: sys("optimize", "--policy", "magic"), code: 2, names: []string{"--policy"}})
	add(hostileCase{name: "optimize-fill-rate-1", args: sys("optimize", "--min-fill-rate", "1"), code: 2, names: []string{"--min-fill-rate"}})
	add(hostileCase{name: "optimize-fill-rate-neg", args: sys("optimize", "--min-fill-rate", "-0.5"), code: 2, names: []string{"--min-fill-rate"}})
	add(hostileCase{name: "simulate-seed-neg", args: sys("simulate", "--order-up-to", "20", "--seed", "-1"), code: 2, names: []string{"--seed"}})
	add(hostileCase{name: "simulate-replications-1", args: sys("simulate", "--order-up-to", "20", "--replications", "1"), code: 2, names: []string{"--replications"}})
	add(hostileCase{name: "simulate-periods-0", args: sys("simulate", "--order-up-to", "20", "--periods", "0"), code: 2, names: []string{"--periods"}})
	add(hostileCase{name: "simulate-warmup-over", args: sys("simulate", "--order-up-to", "20", "--periods", "100", "--warmup", "100"), code: 2, names: []string{"--periods", "warm-up"}})

	// optimize --history --sku --uncertainty (issue 13).
	hist := map[string]string{"h.csv": "sku,period,quantity\nA,1,3\nA,2,0\nA,3,5\nA,4,2\nA,5,4\nA,6,1\nA,7,6\nA,8,2\nZ,1,0\nZ,2,0\n"}
	unc := []string{"optimize", "--history", "{dir}/h.csv", "--sku", "A", "--holding-cost", "1", "--shortage-cost", "9", "--uncertainty", "--resamples", "20"}
	add(hostileCase{name: "optimize-uncertainty-ok", args: unc, files: hist, code: 0})
	for _, v := range []string{"1", "0", "-5", "abc", "1e9", "100001", ""} {
		add(hostileCase{name: fmt.Sprintf("optimize--resamples=%q", v), args: with(unc, "--resamples", v), files: hist, code: 2, names: []string{"--resamples"}})
	}
	for _, v := range []string{"-1", "abc", "1.5"} {
		add(hostileCase{name: fmt.Sprintf("optimize--seed=%q", v), args: with(unc, "--seed", v), files: hist, code: 2, names: []string{"--seed"}})
	}
	add(hostileCase{name: "optimize-resampling-bad", args: with(unc, "--resampling", "jackknife"), files: hist, code: 2, names: []string{"--resampling", "jackknife"}})
	for _, v := range []string{"0", "1.5", "NaN", "abc"} {
		add(hostileCase{name: fmt.Sprintf("optimize--floor-confidence=%q", v), args: append(with(unc, "--floor-confidence", v), "--robust"), files: hist, code: 2, names: []string{"--floor-confidence"}})
	}
	add(hostileCase{name: "optimize-uncertainty-no-history", args: sys("optimize", "--uncertainty"), code: 2, names: []string{"--uncertainty", "--history"}})
	add(hostileCase{name: "optimize-resamples-alone", args: sys("optimize", "--resamples", "50"), code: 2, names: []string{"--resamples", "--uncertainty"}})
	add(hostileCase{name: "optimize-history-no-sku", args: []string{"optimize", "--history", "{dir}/h.csv", "--holding-cost", "1", "--shortage-cost", "9"}, files: hist, code: 2, names: []string{"--history", "--sku"}})
	add(hostileCase{name: "optimize-history-missing", args: with(unc, "--history", "{dir}/none.csv"), code: 1, names: []string{"--history", "none.csv"}})
	add(hostileCase{name: "optimize-history-unknown-sku", args: with(unc, "--sku", "Q"), files: hist, code: 1, names: []string{"h.csv", "\"Q\""}})
	add(hostileCase{name: "optimize-history-no-demand", args: with(unc, "--sku", "Z"), files: hist, code: 1, names: []string{"h.csv", "\"Z\""}})
	add(hostileCase{name: "optimize-uncertainty-with-demand", args: append(append([]string{}, unc...), "--demand", "poisson:mean=3"), files: hist, code: 2, names: []string{"--demand", "--uncertainty"}})
	uitems := map[string]string{"h.csv": hist["h.csv"], "items.csv": "sku,lead_time,holding_cost,shortage_cost\nA,1,1,9\n"}
	ubatch := []string{"batch", "--items", "{dir}/items.csv", "--history", "{dir}/h.csv", "--out", "{dir}/r.csv", "--uncertainty", "--resamples", "10"}
	add(hostileCase{name: "batch-uncertainty-ok", args: ubatch, files: uitems, code: 0})
	add(hostileCase{name: "batch-uncertainty-resamples-1", args: with(ubatch, "--resamples", "1"), files: uitems, code: 2, names: []string{"--resamples"}})
	add(hostileCase{name: "batch-robust-confidence-alone", args: []string{"batch", "--items", "{dir}/items.csv", "--history", "{dir}/h.csv", "--out", "{dir}/r.csv", "--floor-confidence", "0.8"}, files: uitems, code: 2, names: []string{"--floor-confidence"}})
	add(hostileCase{name: "report-uncertainty-no-history", args: []string{"report", "--demand", "poisson:mean=3", "--holding-cost", "1", "--shortage-cost", "9", "--out", "{dir}/p.html", "--uncertainty"}, code: 2, names: []string{"--uncertainty", "--history"}})

	cs = append(cs, networkHostileCases()...)
	return cs
}

// birthDeathList writes a from,to,probability list of a birth-death chain
// on 0..n-1 that moves up with probability up and down with probability
// down, staying put otherwise; the ends reflect.
func birthDeathList(n int, up, down float64) string {
	var b strings.Builder
	b.WriteString("from,to,probability\n")
	for i := 0; i < n; i++ {
		stay := 1.0
		if i+1 < n {
			fmt.Fprintf(&b, "%d,%d,%g\n", i, i+1, up)
			stay -= up
		}
		if i > 0 {
			fmt.Fprintf(&b, "%d,%d,%g\n", i, i-1, down)
			stay -= down
		}
		fmt.Fprintf(&b, "%d,%d,%.17g\n", i, i, stay)
	}
	return b.String()
}
