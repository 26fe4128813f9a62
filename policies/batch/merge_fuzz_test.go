package batch

import (
	"bytes"
	"strings"
	"testing"
)

// FuzzMerge merges an arbitrary second part with a good first one and
// checks that nothing panics, that a refusal is one line naming a part or
// a shard and writes nothing, and that an accepted merge reads back as a
// results file of the parts' rows. Run it with
//
//	go test -run '^$' -fuzz '^FuzzMerge$' -fuzztime 20s ./policies/batch/
func FuzzMerge(f *testing.F) {
	rows := mergeCatalogue(5)
	first := writeShard(f, rows, Shard{0, 2}, Format{}, "")
	for _, s := range []string{
		writeShard(f, rows, Shard{1, 2}, Format{}, ""),
		writeShard(f, rows, Shard{1, 2}, Format{Delimiter: ';', Decimal: ','}, ""),
		writeShard(f, rows, Shard{1, 2}, Format{Digits: 2}, ""),
		writeShard(f, rows, Shard{1, 3}, Format{}, ""),
		strings.Replace(writeShard(f, rows, Shard{1, 2}, Format{}, ""), ",3,,,,,\n", ",1,,,,,\n", 1),
		"", "#", "# ergostock results v2\n", "\ufeff\n", "PK\x03\x04", "# ergostock results v2; period=week; items=x; shard=1/2\nitem\n1\n3\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, second string) {
		var b bytes.Buffer
		sum, err := Merge(&b, []Part{{Name: "a.csv", R: strings.NewReader(first)}, {Name: "b.csv", R: strings.NewReader(second)}})
		if err != nil {
			msg := err.Error()
			if strings.ContainsAny(msg, "\r\n") {
				t.Fatalf("message on more than one line: %q", msg)
			}
			if !strings.HasPrefix(msg, "a.csv") && !strings.HasPrefix(msg, "b.csv") && !strings.HasPrefix(msg, "shard ") {
				t.Fatalf("message names no part: %q", msg)
			}
			if b.Len() > 0 {
				t.Fatalf("wrote %d bytes on refusal", b.Len())
			}
			return
		}
		// The first part's item_count (5) fixes the positions an
		// accepted merge holds.
		if sum.Items != 5 || sum.Meta.Shard != (Shard{0, 1}) {
			t.Fatalf("merged %d items, shard %v:\n%s", sum.Items, sum.Meta.Shard, b.String())
		}
	})
}
