package batch

import (
	"fmt"
	"regexp"
	"strings"

	"ergostock/inventory"
	"ergostock/inventory/tabular"
)

// The demand cell of an items file is in the text grammar of
// inventory.Parse, whose parameters are separated by commas:
// "negbin:mean=2.5,var=9". A spreadsheet in a decimal-comma locale writes
// it "negbin:mean=2,5,var=9". Every parameter of the grammar is key=value,
// so a piece between commas that is digits alone cannot be a parameter:
// it can only be the fractional part of the value before it. The rule
// (decimalCommaSpec) is:
//
//   - a demand without such a piece is read as it is;
//   - in a file whose numbers use a decimal point (a comma-delimited file,
//     --decimal ., or a point found in the cells above), such a piece is
//     refused: the cell mixes marks, and "1,500" may be grouping;
//   - in a file whose numbers use a decimal comma (given or found above),
//     each such piece joins the value before it as its fraction:
//     mean=2,5 is 2.5;
//   - while the mark is still to be found, a piece of one, two or more
//     than three digits is a fraction as well (no digit grouping has that
//     shape), but a piece of exactly three digits after a whole value of
//     one to three digits ("mean=1,500": 1.5 or 1500?) is refused;
//   - the value before the piece must be digits alone (an optional sign):
//     "1.200,5" is refused.
//
// A refusal says to write the demand with a decimal point, which every
// file accepts. The cells above decide the mark in file order, so every
// shard reads the cell alike.

var (
	reDigits    = regexp.MustCompile(`^[0-9]+$`)
	reWholePart = regexp.MustCompile(`^[+-]?[0-9]+$`)
)

// decimalCommaSpec rewrites a demand written with decimal commas into the
// grammar's decimal points under the rule above; nums is the file's
// number reader, whose mark is as found from the rows so far.
func decimalCommaSpec(spec string, nums *tabular.Numbers) (string, error) {
	name, params, ok := strings.Cut(spec, ":")
	if !ok || !strings.Contains(params, ",") {
		return spec, nil
	}
	pieces := strings.Split(params, ",")
	bare := false
	for _, p := range pieces[1:] {
		bare = bare || reDigits.MatchString(strings.TrimSpace(p))
	}
	if !bare {
		return spec, nil
	}
	mark, found := nums.Mark()
	refuse := func(why string) (string, error) {
		eg := ""
		if p := pointed(name, pieces); p != "" {
			eg = " (e.g. " + p + ")"
		}
		return "", &inventory.FieldError{Field: colDemand, Value: spec,
			Want: fmt.Sprintf("the demand with a decimal point%s: %s", eg, why)}
	}
	if found && mark == '.' {
		return refuse("the file's numbers use a decimal point, so the commas can only separate parameters")
	}
	out := make([]string, 0, len(pieces))
	for _, p := range pieces {
		t := strings.TrimSpace(p)
		if len(out) == 0 || !reDigits.MatchString(t) {
			out = append(out, p)
			continue
		}
		k, v, has := strings.Cut(out[len(out)-1], "=")
		v = strings.TrimSpace(v)
		if !has || !reWholePart.MatchString(v) {
			return refuse(fmt.Sprintf("%q is not a parameter key=value, nor the fraction of a whole number before it", t))
		}
		if !found && len(t) == 3 && len(strings.TrimLeft(v, "+-")) <= 3 {
			return refuse(fmt.Sprintf("%s,%s may be a decimal comma or digit grouping, and no number above shows the file's mark", v, t))
		}
		out[len(out)-1] = k + "=" + v + "." + t
	}
	return name + ":" + strings.Join(out, ","), nil
}

// pointed shows the pieces of a demand with each bare digit piece joined
// to the whole number before it by a point, for the message; "" when a
// piece follows something else.
func pointed(name string, pieces []string) string {
	var out []string
	for _, p := range pieces {
		t := strings.TrimSpace(p)
		if len(out) > 0 && reDigits.MatchString(t) {
			_, v, has := strings.Cut(out[len(out)-1], "=")
			if !has || !reWholePart.MatchString(strings.TrimSpace(v)) {
				return ""
			}
			out[len(out)-1] += "." + t
			continue
		}
		out = append(out, t)
	}
	return name + ":" + strings.Join(out, ",")
}
