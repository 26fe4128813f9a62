package report

import (
	"math/rand/v2"
	"os"
	"strings"
	"testing"
	"time"
)

// Seeded mutations of a results file (bytes changed, dropped, or quotes,
// delimiters, line ends and '#' inserted; half of them after a workbook's
// magic number) never panic, never take long, and are either read or
// refused with one line naming the file. A seeded loop rather than a fuzz
// target: the report package is large and its fuzz workers start slowly.
func TestReadResultsMutated(t *testing.T) {
	b, err := os.ReadFile("../../testdata/report/results.csv")
	if err != nil {
		t.Fatal(err)
	}
	r := rand.New(rand.NewPCG(20261202, 11))
	for i := 0; i < 2000; i++ {
		d := []byte(string(b))
		if i%2 == 1 {
			d = []byte("PK\x03\x04")
			for k := r.IntN(60); k > 0; k-- {
				d = append(d, byte(r.IntN(256)))
			}
		}
		for k := 0; k < 1+r.IntN(6); k++ {
			p := r.IntN(len(d))
			switch r.IntN(3) {
			case 0:
				d[p] = byte(r.IntN(256))
			case 1:
				d = append(d[:p], d[p+1:]...)
			default:
				d = append(d[:p], append([]byte{"\",;\n\t#\r"[r.IntN(7)]}, d[p:]...)...)
			}
		}
		start := time.Now()
		_, err := ReadResultsFile(strings.NewReader(string(d)), "r.csv")
		if el := time.Since(start); el > 2*time.Second {
			t.Fatalf("mutation %d took %v", i, el)
		}
		if err != nil {
			if msg := err.Error(); strings.ContainsAny(msg, "\r\n") || !strings.HasPrefix(msg, "r.csv") {
				t.Fatalf("mutation %d: message %q", i, msg)
			}
		}
	}
}
