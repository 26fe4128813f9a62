package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func runMergeCmd(args ...string) (code int, stdout, stderr string) {
	var out, errb bytes.Buffer
	code = run(append([]string{"ergostock", "merge"}, args...), nil, &out, &errb)
	return code, out.String(), errb.String()
}

// The demo catalogue planned in shards and merged is the unsharded run's
// results file byte for byte, in the plain dialect and a spreadsheet one.
func TestMergeShardsEqualsUnsharded(t *testing.T) {
	dir := t.TempDir()
	for _, dialect := range [][]string{nil, {"--out-delimiter", ";", "--out-decimal", ",", "--digits", "6"}} {
		whole := filepath.Join(dir, "whole.csv")
		batchTo(t, 0, whole, dialect...)
		var parts []string
		for k := 0; k < 3; k++ {
			p := filepath.Join(dir, fmt.Sprintf("part-%d.csv", k))
			batchTo(t, 0, p, append([]string{"--shard", fmt.Sprintf("%d/3", k)}, dialect...)...)
			parts = append(parts, p)
		}
		merged := filepath.Join(dir, "merged.csv")
		code, stdout, stderr := runMergeCmd(append([]string{"--out", merged}, parts[2], parts[0], parts[1])...)
		if code != 0 || stdout != "" {
			t.Fatalf("merge %v: exit %d, stdout %q: %s", dialect, code, stdout, stderr)
		}
		if !strings.Contains(stderr, "merge: 196 items from 3 parts of run ") || strings.Count(stderr, "\n") != 1 {
			t.Errorf("summary line: %q", stderr)
		}
		if a, b := readFile(t, merged), readFile(t, whole); !bytes.Equal(a, b) {
			t.Errorf("merge %v differs from the unsharded run (%d vs %d bytes)", dialect, len(a), len(b))
		}
		// To stdout too.
		code, stdout, _ = runMergeCmd(append([]string{"--out", "-"}, parts...)...)
		if code != 0 || stdout != string(readFile(t, whole)) {
			t.Errorf("merge --out -: exit %d, %d bytes", code, len(stdout))
		}
	}
}

// A refused merge exits 1 with one line naming the part, and leaves an
// existing --out as it was.
func TestMergeRefusedLeavesOut(t *testing.T) {
	dir := t.TempDir()
	p0, p1 := filepath.Join(dir, "p0.csv"), filepath.Join(dir, "p1.csv")
	batchTo(t, 0, p0, "--shard", "0/2")
	batchTo(t, 0, p1, "--shard", "1/2", "--max-states", "4000000")
	out := filepath.Join(dir, "merged.csv")
	if err := os.WriteFile(out, []byte("keep me\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, stderr := runMergeCmd("--out", out, p0, p1)
	if code != 1 || strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, p1+":1: run digest ") {
		t.Errorf("exit %d: %q", code, stderr)
	}
	if got := string(readFile(t, out)); got != "keep me\n" {
		t.Errorf("--out changed to %q", got)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 3 {
		t.Errorf("stray files: %v", ents)
	}
}
