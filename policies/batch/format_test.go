package batch

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
)

func TestFormatFloat(t *testing.T) {
	a, b := 0.1, 0.2 // not constants: their sum rounds in float64
	for _, tt := range []struct {
		f    Format
		v    float64
		want string
	}{
		{Format{}, a + b, "0.30000000000000004"},
		{Format{}, 42, "42"},
		{Format{Decimal: ','}, 0.25, "0,25"},
		{Format{Decimal: ','}, 1.5e-15, "1,5e-15"},
		{Format{Digits: 3}, 12345.678, "12300"},
		{Format{Digits: 3}, 0.98765, "0.988"},
		{Format{Digits: 3, Decimal: ','}, 0.000123456, "0,000123"},
		{Format{Digits: 2}, 0, "0"},
		{Format{Digits: 4}, 2.5e-20, "2.5e-20"},
		{Format{Digits: 17}, a + b, "0.30000000000000004"},
		{Format{Digits: 1}, 0.05, "0.05"},
	} {
		if got := tt.f.Float(tt.v); got != tt.want {
			t.Errorf("%+v.Float(%v) = %q, want %q", tt.f, tt.v, got, tt.want)
		}
	}
}

func TestFormatValidate(t *testing.T) {
	for _, tt := range []struct {
		f    Format
		want string // "" for valid
	}{
		{Format{}, ""},
		{Format{Delimiter: ';', Decimal: ','}, ""},
		{Format{Delimiter: '\t', Decimal: ',', Digits: 6}, ""},
		{Format{Delimiter: ',', Decimal: ','}, "--out-delimiter , with --out-decimal ,"},
		{Format{Decimal: ','}, "--out-delimiter , with --out-decimal ,"},
		{Format{Delimiter: '|'}, `--out-delimiter "|": want , ; or tab`},
		{Format{Decimal: '\''}, `--out-decimal "'": want . or ,`},
		{Format{Digits: -1}, "--digits -1: want 1 to 17"},
		{Format{Digits: 18}, "--digits 18: want 1 to 17"},
	} {
		err := tt.f.Validate()
		switch {
		case tt.want == "" && err != nil:
			t.Errorf("%+v: %v", tt.f, err)
		case tt.want != "" && (err == nil || !strings.HasPrefix(err.Error(), tt.want)):
			t.Errorf("%+v: err %v, want %q", tt.f, err, tt.want)
		case err != nil && strings.Contains(err.Error(), "\n"):
			t.Errorf("%+v: message on more than one line: %q", tt.f, err)
		}
	}
}

// sampleRows are a planned row (with a current policy) and a failed one.
func sampleRows() []*Row {
	cur := 51.25
	return []*Row{
		{Item: 0, SKU: "PANTO-STRIP-2", Demand: "negbin:mean=2.5,var=4", DemandMean: 2.5, DemandVariance: 4, Pattern: "erratic",
			Policy:           &policies.Policy{Kind: policies.SS, ReorderPoint: 4, OrderUpTo: 19},
			Figures:          &inventory.Figures{FillRate: 0.98123456789, StockoutProbability: 0.0312, MeanOnHand: 9.87654321, TotalCost: 47.123456},
			CurrentTotalCost: &cur, States: 40, Residual: 1.2e-16, Evaluated: 77, Warnings: []string{"a; b", "=c"}},
		{Item: 1, SKU: "-LAMP", Err: errString("items.csv:3: holding_cost \"x\": want a finite cost >= 0")},
	}
}

type errString string

func (e errString) Error() string { return string(e) }

// The zero Format writes exactly what NewWriter writes; a spreadsheet
// dialect changes only the delimiter, the decimal mark of figures, and
// the byte-order mark.
func TestFormatWriter(t *testing.T) {
	write := func(f *Format) string {
		var b bytes.Buffer
		var w *Writer
		if f == nil {
			w = NewWriter(&b)
		} else {
			var err error
			if w, err = NewFormatWriter(&b, *f); err != nil {
				t.Fatal(err)
			}
		}
		m := Meta{Format: MetaFormat, Period: "week", Items: "i", History: "none", Version: "t"}
		if err := w.WriteMeta(m); err != nil {
			t.Fatal(err)
		}
		w.WriteHeader()
		for _, r := range sampleRows() {
			if err := w.Write(r); err != nil {
				t.Fatal(err)
			}
		}
		if err := w.Flush(); err != nil {
			t.Fatal(err)
		}
		return b.String()
	}
	plain := write(nil)
	if got := write(&Format{}); got != plain {
		t.Fatalf("zero Format:\n%s\nNewWriter:\n%s", got, plain)
	}
	semi := write(&Format{Delimiter: ';', Decimal: ','})
	if !strings.HasPrefix(semi, "\ufeff# ergostock results v2;") || !strings.Contains(strings.SplitN(semi, "\n", 2)[0], "; decimal=comma") {
		t.Errorf("header record: %q", strings.SplitN(semi, "\n", 2)[0])
	}
	for _, want := range []string{"negbin:mean=2.5,var=4;2,5;4;erratic;s-S;4;19;;;;;0,98123456789;0,0312;9,87654321;", ";1,2e-16;", `"a; b; =c"`, "\n'-LAMP;"} {
		if !strings.Contains(semi, want) {
			t.Errorf("semicolon file lacks %q:\n%s", want, semi)
		}
	}
	digits := write(&Format{Digits: 3})
	if !strings.Contains(digits, ",0.981,0.0312,9.88,") || !strings.Contains(digits, "; digits=3") {
		t.Errorf("--digits 3:\n%s", digits)
	}
}

func TestColumnKind(t *testing.T) {
	for _, name := range Header() {
		k := ColumnKind(name)
		switch name {
		case "sku", "demand", "pattern", "policy", "warnings", "error":
			if k != TextCell {
				t.Errorf("%s: kind %d, want text", name, k)
			}
		case "fill_rate", "stockout_probability":
			if k != PercentCell {
				t.Errorf("%s: kind %d, want percent", name, k)
			}
		}
	}
	if ColumnKind("supplier") != TextCell || ColumnKind("item") != WholeCell || ColumnKind("total_cost") != FigureCell {
		t.Error("kinds of supplier, item, total_cost")
	}
	if RoundDigits(math.Pi, 4) != 3.142 {
		t.Errorf("RoundDigits(pi, 4) = %v", RoundDigits(math.Pi, 4))
	}
}
