package history

import (
	"fmt"
	"math"
	"strings"

	"ergostock/inventory/tabular"
)

// Returns says what a negative quantity (a return or a correction) does.
type Returns int

// The ways of reading returns.
const (
	// ReturnsIgnore leaves returns out of the demand; their rows and units
	// are counted in the SKU's warnings.
	ReturnsIgnore Returns = iota
	// ReturnsNet subtracts returns from the demand of their period; a
	// period whose returns exceed its demand counts 0.
	ReturnsNet
	// ReturnsError makes every return a bad row.
	ReturnsError
)

// String returns "ignore", "net" or "error".
func (r Returns) String() string {
	switch r {
	case ReturnsNet:
		return "net"
	case ReturnsError:
		return "error"
	}
	return "ignore"
}

// ParseReturns reads a --returns value: ignore, net or error.
func ParseReturns(s string) (Returns, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "ignore":
		return ReturnsIgnore, nil
	case "net":
		return ReturnsNet, nil
	case "error":
		return ReturnsError, nil
	}
	return 0, fmt.Errorf("want ignore, net or error")
}

// ParseReturnsColumn reads a --returns-column value "COLUMN=VALUE": the
// rows whose COLUMN holds VALUE (ignoring case and surrounding spaces) are
// returns whatever the sign of their quantity.
func ParseReturnsColumn(s string) (column, value string, err error) {
	if strings.TrimSpace(s) == "" {
		return "", "", nil
	}
	c, v, ok := strings.Cut(s, "=")
	c, v = strings.TrimSpace(c), strings.TrimSpace(v)
	if !ok || c == "" || v == "" {
		return "", "", fmt.Errorf("%q: want COLUMN=VALUE, such as type=RETURN", s)
	}
	return c, v, nil
}

// ParseScale reads a --quantity-scale value: a finite number > 0 by which
// every quantity is multiplied before it must be whole (10 plans in tenths).
func ParseScale(s string) (float64, error) {
	var n tabular.Numbers
	v, err := n.Parse(s, 0)
	if err != nil || !(v > 0) || math.IsInf(v, 0) || v > 1e12 {
		return 0, fmt.Errorf("%q: want a number > 0 such as 10 (plan in tenths) or 1000", s)
	}
	return v, nil
}

// Options change how Read reads a history. The zero value reads as Read
// always has, and finds the dialect, decimal mark and date layout from the
// file.
type Options struct {
	// Table fixes the delimiter, the encoding or the sheet of a workbook.
	Table tabular.Options
	// Decimal is the decimal mark of the quantities, '.' or ','; 0 finds
	// it (a comma only when the delimiter is not one).
	Decimal byte
	// Dates is the layout of the date column; "" or DateAuto finds it.
	Dates tabular.DateLayout
	// Columns maps the reader's column names (sku, date, period,
	// quantity, location) to the file's headers; ColumnsFlag names the
	// option that gave it, for messages.
	Columns     map[string]string
	ColumnsFlag string
	// Returns says what negative quantities (and the rows marked by
	// ReturnsColumn) do.
	Returns Returns
	// ReturnsColumn and ReturnsValue mark returns by a column: the rows
	// whose column holds the value.
	ReturnsColumn, ReturnsValue string
	// Scale multiplies every quantity before it must be whole (0 is 1):
	// 10 plans in tenths of the file's unit.
	Scale float64
	// ByLocation keys the series by sku and location when the file has a
	// location column; otherwise the locations of a SKU are summed.
	ByLocation bool
}

// UnitNote says in what unit the quantities of a scaled history count:
// "quantities in units of 0.1"; "" for scale 1.
func UnitNote(scale float64) string {
	if scale == 0 || scale == 1 {
		return ""
	}
	return "quantities in units of " + strings.TrimRight(strings.TrimRight(fmt.Sprintf("%.9f", 1/scale), "0"), ".")
}
