package main

import (
	"fmt"
	"os"

	"github.com/urfave/cli/v2"

	"ergostock/policies/batch"
)

const mergeDescription = `Joins the parts of one catalogue run split with batch --shard K/N into the
results file of the whole run:

  ergostock batch --items items.csv --history history.csv --shard 0/4 --out part-0.csv
  ...
  ergostock batch --items items.csv --history history.csv --shard 3/4 --out part-3.csv
  ergostock merge --out results.csv part-*.csv

The parts must share one header record run digest (the same items, history,
period, --max-states and ergostock version), one column header and one
dialect (--out-delimiter, --out-decimal, --digits), be the shards 0/N to
N-1/N each once, and their item positions must cover 0..n-1 exactly once.
The merged file has the header record once (shard=0/1), then every row in
item order: the file the unsharded run writes, byte for byte. It is written
atomically, like the results of batch (--out - writes to stdout).

Exit status: 0 when the file was written; 1 when a part cannot be used (a
one-line error names the part and the line; nothing is written); 2 for a
usage error.`

func mergeCommand() *cli.Command {
	return &cli.Command{
		Name:        "merge",
		Usage:       "join the results of batch --shard runs into the results of the whole catalogue",
		UsageText:   "ergostock merge --out FILE PART.csv...",
		ArgsUsage:   "PART.csv...",
		Description: mergeDescription,
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "out", Usage: "results file (CSV) to write; - writes to stdout", Required: true},
		},
		Action: runMerge,
	}
}

func runMerge(c *cli.Context) error {
	out := c.String("out")
	names := c.Args().Slice()
	if len(names) == 0 {
		return usageErr("merge: no parts given: want the results files of the shards after the flags, e.g. ergostock merge --out results.csv part-*.csv")
	}
	if isWorkbookName(out) {
		return usageErr("--out %s: merge writes CSV; convert the merged file, or run batch unsharded with --out FILE.xlsx", out)
	}
	var parts []batch.Part
	for _, name := range names {
		if out != "-" && sameFile(name, out) {
			return usageErr("--out %s: it is the part %s; choose another file for the merged results", out, name)
		}
		f, err := os.Open(name)
		if err != nil {
			return fmt.Errorf("part %w", err)
		}
		defer f.Close()
		parts = append(parts, batch.Part{Name: name, R: f})
	}
	// Merge checks every part before it writes a byte; the atomic file
	// keeps an existing --out as it was if it fails even so.
	var sum *batch.MergeSummary
	var err error
	if out == "-" {
		if sum, err = batch.Merge(c.App.Writer, parts); err != nil {
			return err // a refusal names the part
		}
	} else {
		af, err := batch.CreateAtomic(out)
		if err != nil {
			return fmt.Errorf("--out %s: %w", out, err)
		}
		defer af.Abort()
		if sum, err = batch.Merge(af, parts); err != nil {
			return err // a refusal names the part
		}
		if err := af.Commit(); err != nil {
			return fmt.Errorf("--out %s: %w", out, err)
		}
	}
	where := "results in " + out
	if out == "-" {
		where = "results on stdout"
	}
	fmt.Fprintf(c.App.ErrWriter, "ergostock: merge: %d items from %d parts of run %s (planning period %s); %s\n",
		sum.Items, sum.Parts, sum.Meta.Run, sum.Meta.Period, where)
	return nil
}
