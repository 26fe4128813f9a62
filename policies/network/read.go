package network

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"ergostock/inventory"
	"ergostock/inventory/tabular"
)

// Columns of the network file. location, parent, lead_time, demand,
// holding_cost and shortage_cost are required; base_stock (needed to
// evaluate or simulate, not to optimize) and min_fill_rate (a store's
// fill-rate floor for optimize) may be left out.
var Columns = []string{"location", "parent", "lead_time", "demand", "holding_cost", "shortage_cost", "base_stock", "min_fill_rate"}

var required = []string{"location", "parent", "lead_time", "demand", "holding_cost", "shortage_cost"}

// MaxLocations bounds the rows of a network file.
const MaxLocations = 100000

// ReadFile reads a network file (delimited text or .xlsx) through the
// shared tabular reader; levels says what the centre's base_stock means.
func ReadFile(path string, levels Levels, opt tabular.Options) (*Network, error) {
	r, closer, err := tabular.OpenFile(path, opt)
	if err != nil {
		return nil, err
	}
	defer closer()
	return read(r, levels, CatalogueOptions{})
}

// ReadFileWith reads a network file as ReadFile does, with the column map,
// decimal mark and demand source of opt (opt.Table is the dialect; the
// sku passed to opt.Demand is ""). Notes from opt.Demand are returned.
func ReadFileWith(path string, levels Levels, opt CatalogueOptions) (*Network, []string, error) {
	r, closer, err := tabular.OpenFile(path, opt.Table)
	if err != nil {
		return nil, nil, err
	}
	defer closer()
	var notes []string
	hook := opt.Demand
	if hook != nil {
		opt.Demand = func(sku string, l Location) (inventory.Distribution, string, error) {
			d, note, err := hook(sku, l)
			if note != "" {
				notes = append(notes, note)
			}
			return d, note, err
		}
	}
	n, err := read(r, levels, opt)
	return n, notes, err
}

// Read reads a network from r, named name in messages.
func Read(r io.Reader, name string, levels Levels, opt tabular.Options) (*Network, error) {
	t, err := tabular.Open(r, name, opt)
	if err != nil {
		return nil, err
	}
	return read(t, levels, CatalogueOptions{})
}

func read(r *tabular.Reader, levels Levels, opt CatalogueOptions) (*Network, error) {
	req := required
	if opt.Demand != nil {
		req = nil
		for _, k := range required {
			if k != "demand" {
				req = append(req, k)
			}
		}
	}
	idx, err := tabular.Columns{Known: Columns, Required: req, Map: opt.Columns, MapFlag: opt.ColumnsFlag}.Index(r)
	if err != nil {
		return nil, err
	}
	nums := &tabular.Numbers{File: r.Name, Decimal: opt.Decimal}
	var locs []Location
	for {
		rec, line, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, err
		}
		if len(locs) >= MaxLocations {
			return nil, &tabular.Error{File: r.Name, Line: line, Err: fmt.Errorf("more than %d locations: want a smaller network", MaxLocations)}
		}
		l, err := parseRow(r.Name, rec, line, idx, nums)
		if err == nil && l.Demand == nil && opt.Demand != nil {
			l.Demand, _, err = opt.Demand("", l)
		}
		if err != nil {
			return nil, err
		}
		locs = append(locs, l)
	}
	return assemble(r.Name, r.HeaderLine, locs, levels)
}

// assemble makes a network of the locations read from file.
func assemble(file string, headerLine int, locs []Location, levels Levels) (*Network, error) {
	n := &Network{File: file, Levels: levels}
	var centres []Location
	for _, l := range locs {
		if l.Parent == "" {
			centres = append(centres, l)
		} else {
			n.Stores = append(n.Stores, l)
		}
	}
	switch len(centres) {
	case 0:
		if len(n.Stores) == 0 {
			return nil, &tabular.Error{File: file, Line: headerLine, Err: errors.New("no locations: want a centre (empty parent) and its stores")}
		}
		return nil, &tabular.Error{File: file, Line: n.Stores[0].Line, Column: "parent", Err: errors.New("no location has an empty parent: want exactly one centre")}
	case 1:
		n.Centre = centres[0]
	default:
		return nil, &tabular.Error{File: file, Line: centres[1].Line, Column: "parent", Err: fmt.Errorf("empty, as for %q (line %d): want exactly one centre (two levels: one centre and its stores)", centres[0].Name, centres[0].Line)}
	}
	if err := n.Validate(false); err != nil {
		return nil, err
	}
	return n, nil
}

// parseRow reads one location from a record.
func parseRow(name string, rec []string, line int, idx map[string]int, nums *tabular.Numbers) (Location, error) {
	var err error
	cell := func(k string) string {
		if i, ok := idx[k]; ok {
			return strings.TrimSpace(rec[i])
		}
		return ""
	}
	bad := func(col, format string, a ...any) error {
		return &tabular.Error{File: name, Line: line, Column: col, Err: fmt.Errorf(format, a...)}
	}
	whole := func(col string, lo, hi float64) (int, error) {
		v, err := nums.Parse(cell(col), line)
		if err != nil {
			return 0, bad(col, "%v", err)
		}
		if v != math.Trunc(v) || v < lo || v > hi {
			return 0, bad(col, "%q: want a whole number from %g to %g", cell(col), lo, hi)
		}
		return int(v), nil
	}
	l := Location{Name: cell("location"), Parent: cell("parent"), Line: line}
	if l.Name == "" {
		return Location{}, bad("location", "empty: want a name")
	}
	if strings.ContainsAny(l.Name, "\r\n") {
		return Location{}, bad("location", "%q: want a name on one line", l.Name)
	}
	if cell("lead_time") == "" {
		return Location{}, bad("lead_time", "empty: want a whole number of periods >= 0")
	}
	if strings.Contains(cell("lead_time"), ":") {
		return Location{}, bad("lead_time", "%q: want a whole number of periods (lead-time laws are not modelled in a network)", cell("lead_time"))
	}
	if l.LeadTime, err = whole("lead_time", 0, 100000); err != nil {
		return Location{}, err
	}
	if d := cell("demand"); d != "" {
		if l.Demand, err = inventory.Parse(d); err != nil {
			return Location{}, bad("demand", "%v", err)
		}
	}
	for _, c := range []struct {
		col string
		dst *float64
	}{{"holding_cost", &l.Holding}, {"shortage_cost", &l.Shortage}} {
		if cell(c.col) == "" {
			if c.col == "shortage_cost" && l.Parent == "" {
				continue // the centre's may be empty
			}
			return Location{}, bad(c.col, "empty: want a finite cost >= 0")
		}
		v, err := nums.Parse(cell(c.col), line)
		if err != nil {
			return Location{}, bad(c.col, "%v", err)
		}
		if v < 0 || v > 1e300 {
			return Location{}, bad(c.col, "%q: want a finite cost >= 0", cell(c.col))
		}
		*c.dst = v
	}
	if cell("base_stock") != "" {
		if l.BaseStock, err = whole("base_stock", -MaxLevel, MaxLevel); err != nil {
			return Location{}, err
		}
		l.HasLevel = true
	}
	if cell("min_fill_rate") != "" {
		v, _, err := nums.Fraction(cell("min_fill_rate"), line)
		if err != nil {
			return Location{}, bad("min_fill_rate", "%v", err)
		}
		if v < 0 || v >= 1 {
			return Location{}, bad("min_fill_rate", "%q: want a fraction from 0 to below 1 (such as 0.95 or 95%%)", cell("min_fill_rate"))
		}
		l.MinFillRate = v
	}
	return l, nil
}
