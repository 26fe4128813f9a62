package main

import (
	"errors"
	"fmt"
	"regexp"
	"strconv"
	"strings"

	"github.com/urfave/cli/v2"

	"ergostock/inventory"
)

// Numbers on the command line follow one rule, the same as in the demand
// grammar and the input files (inventory.ParseNumber and ParseInt): a plain
// decimal with an optional sign, fraction and exponent. The flag package
// alone would take 0x10, 0o17 and 1_000 for whole numbers and Inf for
// numbers, which the files refuse, and would refuse 1e3 for a whole
// number, which the files take; normalizeNumbers applies the rule before
// the flags are parsed.

// numberKind tells what a flag of cmd wants: "whole" for integer flags,
// "number" for floating-point ones, "" for others; takesValue is false for
// boolean flags.
func numberKind(f cli.Flag) (kind string, takesValue bool) {
	switch f.(type) {
	case *cli.IntFlag, *cli.Int64Flag, *cli.UintFlag, *cli.Uint64Flag:
		return "whole", true
	case *cli.Float64Flag:
		return "number", true
	case *cli.BoolFlag:
		return "", false
	}
	return "", true
}

// lookupFlag finds the flag of cmd called name (or one of its aliases).
func lookupFlag(cmd *cli.Command, name string) cli.Flag {
	for _, f := range cmd.Flags {
		for _, n := range f.Names() {
			if n == name {
				return f
			}
		}
	}
	return nil
}

// normalizeNumbers checks the values of cmd's numeric flags in args
// against the number rule and writes whole numbers such as 1e3 or 2.0 as
// plain digits for the flag parser; it changes args in place. Unknown
// flags and other mistakes are left to the flag parser.
func normalizeNumbers(cmd *cli.Command, args []string) error {
	for i := 0; i < len(args); i++ {
		a := args[i]
		if a == "--" {
			return nil
		}
		if len(a) < 2 || a[0] != '-' {
			continue
		}
		name, value, inline := strings.Cut(strings.TrimLeft(a, "-"), "=")
		f := lookupFlag(cmd, name)
		if f == nil {
			continue
		}
		kind, takes := numberKind(f)
		if !takes {
			continue
		}
		at := i
		if !inline {
			if i+1 >= len(args) {
				return nil // the parser says a value is missing
			}
			i++
			at = i
			value = args[i]
		}
		switch kind {
		case "whole":
			n, err := inventory.ParseInt(value)
			if errors.Is(err, inventory.ErrNumberRange) {
				return fmt.Errorf("--%s %s: want a whole number between -9223372036854775808 and 9223372036854775807", name, showValue(value))
			}
			if err != nil {
				return fmt.Errorf("--%s %s: want a whole number written in decimal digits, such as 3, -2 or 1e3", name, showValue(value))
			}
			digits := strconv.FormatInt(n, 10)
			if inline {
				args[at] = a[:strings.Index(a, "=")+1] + digits
			} else {
				args[at] = digits
			}
		case "number":
			if _, err := inventory.ParseNumber(value); err != nil {
				if errors.Is(err, inventory.ErrNumberRange) {
					return fmt.Errorf("--%s %s: want a finite number (at most about 1.8e308 in size)", name, showValue(value))
				}
				return fmt.Errorf("--%s %s: want a number written as a plain decimal, such as 0.4, 12 or 1.5e3", name, showValue(value))
			}
		}
	}
	return nil
}

var (
	invalidValue = regexp.MustCompile(`^invalid value "(.*)" for flag -([^:]+): (.*)$`)
	needsValue   = regexp.MustCompile(`^flag needs an argument: -+(.*)$`)
	notDefined   = regexp.MustCompile(`^flag provided but not defined: -+(.*)$`)
)

// flagMessage rewrites the flag parser's errors in the tool's words: the
// flag with its two dashes, the value typed, and what was wanted.
func flagMessage(cmd *cli.Command, err error) string {
	msg := err.Error()
	if m := invalidValue.FindStringSubmatch(msg); m != nil {
		value, name, why := m[1], m[2], m[3]
		want := "a valid value"
		var f cli.Flag
		if cmd != nil {
			f = lookupFlag(cmd, name)
		}
		kind, _ := numberKind(f)
		if kind == "" {
			if _, ok := f.(*cli.GenericFlag); ok {
				// The flag's own parser said what it wants.
				return fmt.Sprintf("--%s %s: %s", name, showValue(value), why)
			}
		}
		switch {
		case kind == "whole" && strings.Contains(why, "out of range"):
			want = "a whole number between -9223372036854775808 and 9223372036854775807"
		case kind == "whole":
			want = "a whole number"
		case kind == "number" && strings.Contains(why, "out of range"):
			want = "a finite number (at most about 1.8e308 in size)"
		case kind == "number":
			want = "a number"
		default:
			if _, ok := f.(*cli.DurationFlag); ok {
				want = "a duration such as 90s, 5m or 1h30m"
			}
		}
		return fmt.Sprintf("--%s %s: want %s", name, showValue(value), want)
	}
	if m := needsValue.FindStringSubmatch(msg); m != nil {
		return fmt.Sprintf("--%s: a value must follow the flag", m[1])
	}
	if m := notDefined.FindStringSubmatch(msg); m != nil {
		where := ""
		if cmd != nil {
			where = " of " + cmd.Name
		}
		return fmt.Sprintf("--%s: no such flag%s", m[1], where)
	}
	return msg
}

// showValue writes a typed value for a message: as it is, or quoted when
// it is empty or holds spaces or quotes.
func showValue(v string) string {
	if v == "" || strings.ContainsAny(v, " \t\"'") {
		return fmt.Sprintf("%q", v)
	}
	return v
}
