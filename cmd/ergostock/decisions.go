package main

import (
	"bytes"
	"fmt"
	"io"
	"os"

	"ergostock/policies/batch"
)

// applyDecisionsFile makes the latest decision of each SKU in the
// decisions file at path (none when path is "") the policy in use of its
// items, before the batch plans them (see batch.ApplyDecisions).
// byLocation says that the items plan by (sku, location): the decisions
// must then have a location column (batch.CheckDecisionsLocation). It
// returns the digest of the file's bytes for the results' header record
// ("" without a file).
func applyDecisionsFile(path string, items []batch.Item, byLocation bool, stderr io.Writer) (digest string, err error) {
	if path == "" {
		return "", nil
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return "", fmt.Errorf("--decisions: %w", err)
	}
	log, err := batch.ReadDecisionLog(bytes.NewReader(data), path)
	if err != nil {
		return "", err
	}
	if err := batch.CheckDecisionsLocation(log, byLocation, path); err != nil {
		return "", err
	}
	n, unmatched := batch.ApplyDecisions(items, log.Decisions, path)
	msg := fmt.Sprintf("ergostock: %s: %d items take their latest decision as the policy in use", path, n)
	if len(unmatched) > 0 {
		msg += fmt.Sprintf("; %d SKUs of the decisions are not in the items file (first %q)", len(unmatched), unmatched[0])
	}
	fmt.Fprintln(stderr, msg)
	h := batch.NewDigest()
	h.Write(data)
	return batch.DigestSum(h), nil
}
