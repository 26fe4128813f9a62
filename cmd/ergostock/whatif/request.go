package whatif

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"regexp"
	"sort"
	"strings"
)

// systemKeys are the request names of the system flags of evaluate and
// optimize (--max-states is the server's own setting, not a request's).
var systemKeys = []string{"demand", "lead_time", "lead_time_model", "review_period",
	"holding_cost", "shortage_cost", "order_cost", "unit_cost", "unmet"}

// policyKeys are the levels of evaluate.
var policyKeys = []string{"reorder_point", "order_up_to", "order_multiple"}

// searchKeys are optimize's own flags.
var searchKeys = []string{"policy", "min_fill_rate", "max_stockout_probability", "max_evaluations"}

// keysOf returns the request names a command takes.
func keysOf(command string) []string {
	k := append([]string(nil), systemKeys...)
	if command == "optimize" {
		return append(k, searchKeys...)
	}
	return append(k, policyKeys...)
}

// flagOf turns a request name into its flag: order_up_to -> order-up-to.
func flagOf(key string) string { return strings.ReplaceAll(key, "_", "-") }

// requestError is a refusal of the request itself: status 400 (or 413).
type requestError struct {
	status int
	msg    string
}

func (e *requestError) Error() string { return e.msg }

func badRequest(format string, a ...any) error {
	return &requestError{status: 400, msg: fmt.Sprintf(format, a...)}
}

// decodeObject reads one JSON object from r into raw values, refusing
// anything else (a second value, an array, trailing bytes). A body past
// the size limit is a 413.
func decodeObject(r io.Reader) (map[string]json.RawMessage, error) {
	dec := json.NewDecoder(r)
	var obj map[string]json.RawMessage
	if err := dec.Decode(&obj); err != nil {
		var mbe *http.MaxBytesError
		if errors.As(err, &mbe) {
			return nil, &requestError{status: 413, msg: "request body too large: want at most " + fmt.Sprint(maxBody) + " bytes"}
		}
		if err == io.EOF {
			return nil, badRequest("empty request body: want a JSON object such as {\"demand\": \"poisson:mean=4\", ...}")
		}
		return nil, badRequest("request body: want one JSON object: %s", oneLine(err.Error()))
	}
	if obj == nil {
		return nil, badRequest("request body: want a JSON object, not null")
	}
	if _, err := dec.Token(); err != io.EOF {
		var mbe *http.MaxBytesError
		if errors.As(err, &mbe) {
			return nil, &requestError{status: 413, msg: "request body too large: want at most " + fmt.Sprint(maxBody) + " bytes"}
		}
		return nil, badRequest("request body: want one JSON object and nothing after it")
	}
	return obj, nil
}

// argsOf turns a request object into the flags of command, in the fixed
// order of keysOf, refusing unknown names and values that are neither a
// number nor a string. A null value is a flag not given.
func argsOf(command string, obj map[string]json.RawMessage) ([]string, error) {
	keys := keysOf(command)
	known := map[string]bool{}
	for _, k := range keys {
		known[k] = true
	}
	var unknown []string
	for k := range obj {
		if !known[k] {
			unknown = append(unknown, k)
		}
	}
	if len(unknown) > 0 {
		sort.Strings(unknown)
		return nil, badRequest("%s: unknown field %q: want one of %s", command, unknown[0], strings.Join(keys, ", "))
	}
	var args []string
	for _, k := range keys {
		raw, ok := obj[k]
		if !ok {
			continue
		}
		v, given, err := scalar(raw)
		if err != nil {
			return nil, badRequest("%s: %v", k, err)
		}
		if given {
			args = append(args, "--"+flagOf(k)+"="+v)
		}
	}
	return args, nil
}

// argsOfQuery is argsOf for the parameters of a GET request.
func argsOfQuery(command string, q url.Values) ([]string, error) {
	obj := map[string]json.RawMessage{}
	for k, vs := range q {
		if len(vs) != 1 {
			return nil, badRequest("%s: given %d times: want it once", k, len(vs))
		}
		b, _ := json.Marshal(vs[0])
		obj[k] = b
	}
	return argsOf(command, obj)
}

// scalar returns the text of a JSON number (as written) or string; given
// is false for null.
func scalar(raw json.RawMessage) (text string, given bool, err error) {
	raw = bytes.TrimSpace(raw)
	if len(raw) == 0 || string(raw) == "null" {
		return "", false, nil
	}
	switch raw[0] {
	case '"':
		var s string
		if err := json.Unmarshal(raw, &s); err != nil {
			return "", false, errors.New("want a string")
		}
		if strings.ContainsAny(s, "\n\r") {
			return "", false, errors.New("want a value on one line")
		}
		return s, true, nil
	case '-', '0', '1', '2', '3', '4', '5', '6', '7', '8', '9':
		return string(raw), true, nil
	}
	return "", false, fmt.Errorf("%s: want a number or a string", short(string(raw)))
}

// short cuts a quoted value for a message.
func short(s string) string {
	s = oneLine(s)
	if len(s) > 40 {
		return s[:37] + "..."
	}
	return s
}

// oneLine folds a message onto one line.
func oneLine(s string) string {
	return strings.Map(func(r rune) rune {
		if r == '\n' || r == '\r' {
			return ' '
		}
		return r
	}, s)
}

var flagRE = regexp.MustCompile(`--([a-z][a-z0-9]*(?:-[a-z0-9]+)*)`)

// keyMessage writes the flags a command-line message names as the request
// names of command ("--holding-cost -3: ..." -> "holding_cost -3: ...");
// other text is left as the command line gives it.
func keyMessage(command, msg string) string {
	known := map[string]bool{}
	for _, k := range keysOf(command) {
		known[flagOf(k)] = true
	}
	return flagRE.ReplaceAllStringFunc(msg, func(m string) string {
		name := m[2:]
		if known[name] {
			return strings.ReplaceAll(name, "-", "_")
		}
		return m
	})
}
