package inventory

import (
	"errors"
	"fmt"
)

// FieldError reports an unusable value of one named input. Field is the
// snake_case name shared by the command-line flags (with dashes) and the
// columns of the items file, such as "holding_cost" or "demand".
type FieldError struct {
	Field string
	Value string // the offending value as given
	Want  string // what was expected
	Err   error  // an underlying cause, if any
}

func (e *FieldError) Error() string {
	if e.Err != nil {
		return fmt.Sprintf("%s %q: want %s: %v", e.Field, e.Value, e.Want, e.Err)
	}
	return fmt.Sprintf("%s %q: want %s", e.Field, e.Value, e.Want)
}

func (e *FieldError) Unwrap() error { return e.Err }

// ErrLimit is wrapped by the errors of inputs that are well formed but lie
// beyond what the evaluation can hold or resolve (a law double precision
// cannot carry, a service floor finer than the figures' accuracy): a
// command reports them with exit status 1, not as command-line mistakes.
var ErrLimit = errors.New("beyond the limits of the evaluation")
