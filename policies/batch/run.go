package batch

import (
	"context"
	"fmt"
	"runtime/debug"
	"sync"
	"sync/atomic"
	"time"
)

// RunOptions are the options of Run.
type RunOptions struct {
	// Workers is the number of items worked on at once (at least 1).
	Workers int
	// ItemTimeout, when positive, is the budget of one item: its context
	// gets this deadline, and when it passes Run stops waiting for the
	// item and hands fail a *TimeoutError (the item's goroutine, which Go
	// cannot stop, is left to notice its context and return; its result
	// is dropped). At most 2 x Workers such goroutines may run on at once;
	// past that, a worker waits for one of them to end before it takes new
	// work, so that items deaf to their context cannot exhaust memory.
	ItemTimeout time.Duration
	// Order, when not nil, is the order in which items are started: a
	// permutation of 0..n-1 (expensive items first, so that the last item
	// to finish is not a long one started late). Results are still handed
	// to emit in index order. Nil starts them in index order.
	Order []int
}

// TimeoutError is the error of an item that ran past its budget.
type TimeoutError struct {
	Limit time.Duration
	Stage string // what the item was doing, "" if unknown
}

func (e *TimeoutError) Error() string {
	msg := fmt.Sprintf("item took longer than --item-timeout %v", e.Limit)
	if e.Stage != "" {
		msg += " (while " + e.Stage + ")"
	}
	return msg
}

// PanicError is the error of an item whose work panicked.
type PanicError struct {
	Value any
	Stack []byte
}

func (e *PanicError) Error() string { return fmt.Sprintf("internal error: %v", e.Value) }

// itemState travels in an item's context: its budget and what it is doing,
// for the message when the budget runs out.
type itemState struct {
	limit time.Duration
	stage atomic.Pointer[string]
}

type itemKey struct{}

// SetStage records in ctx (an item's context given by Run) what the item
// is doing now, in words that follow "while", e.g. "optimizing s-S". It
// does nothing on another context.
func SetStage(ctx context.Context, stage string) {
	if st, ok := ctx.Value(itemKey{}).(*itemState); ok {
		st.stage.Store(&stage)
	}
}

// timeoutOf returns the *TimeoutError of an item's context whose deadline
// has passed, or nil.
func timeoutOf(ctx context.Context) *TimeoutError {
	st, ok := ctx.Value(itemKey{}).(*itemState)
	if !ok || ctx.Err() != context.DeadlineExceeded {
		return nil
	}
	e := &TimeoutError{Limit: st.limit}
	if s := st.stage.Load(); s != nil {
		e.Stage = *s
	}
	return e
}

// Run computes do(ctx_i, 0), ..., do(ctx_i, n-1) on opt.Workers goroutines
// and hands each result to emit in index order, from the calling goroutine,
// so emit needs no locking and what it writes does not depend on the number
// of workers. A worker takes the next index as soon as it is free; results
// that finish before an earlier one wait in a queue (they should be small),
// so one slow item never idles the other workers.
//
// Anything that goes wrong inside one item is that item's alone: a panic of
// do is recovered and handed to fail as a *PanicError (with the stack), and
// an item past opt.ItemTimeout is handed to fail as a *TimeoutError; fail
// builds the item's result from the error.
//
// When ctx is cancelled (an interrupt), Run stops handing out work, stops
// waiting for the items in progress and returns ctx's error. When emit
// returns an error, Run stops handing out work, waits for the items in
// progress (at most their budget) and returns that error.
func Run[T any](ctx context.Context, n int, opt RunOptions, do func(ctx context.Context, i int) T, fail func(i int, err error) T, emit func(i int, v T) error) error {
	if n <= 0 {
		return ctx.Err()
	}
	if opt.Order != nil && !isPermutation(opt.Order, n) {
		return fmt.Errorf("batch: RunOptions.Order is not a permutation of 0..%d", n-1)
	}
	workers := max(1, min(opt.Workers, n))
	type result struct {
		i int
		v T
	}
	results := make(chan result, workers)
	quit := make(chan struct{}) // closed when the consumer returns
	defer close(quit)
	var next atomic.Int64
	var stop atomic.Bool
	var wg sync.WaitGroup
	// Items abandoned at their deadline whose goroutine still runs (a
	// step that does not check its context): at most 2 x workers of them,
	// so that such items cannot pile up and exhaust memory. A worker that
	// would abandon one more waits for one of them to end.
	abandoned := make(chan struct{}, 2*workers)
	const (
		running int32 = iota
		completed
		dropped
	)
	one := func(i int) T {
		st := &itemState{limit: opt.ItemTimeout}
		base := context.WithValue(ctx, itemKey{}, st)
		var ictx context.Context
		var cancel context.CancelFunc
		if opt.ItemTimeout > 0 {
			ictx, cancel = context.WithTimeout(base, opt.ItemTimeout)
		} else {
			ictx, cancel = context.WithCancel(base)
		}
		defer cancel()
		type outcome struct {
			v   T
			err error
		}
		done := make(chan outcome, 1)
		var state atomic.Int32
		go func() {
			defer func() {
				if !state.CompareAndSwap(running, completed) {
					<-abandoned // the worker gave up on us: free our slot
				}
			}()
			defer func() {
				if p := recover(); p != nil {
					done <- outcome{err: &PanicError{Value: p, Stack: debug.Stack()}}
				}
			}()
			done <- outcome{v: do(ictx, i)}
		}()
		result := func(o outcome) T {
			if o.err != nil {
				return fail(i, o.err)
			}
			return o.v
		}
		select {
		case o := <-done:
			return result(o)
		case <-ictx.Done():
		}
		if !state.CompareAndSwap(running, dropped) {
			// It finished as the deadline passed: a result beats the deadline.
			return result(<-done)
		}
		select {
		case abandoned <- struct{}{}:
		case <-ctx.Done():
		}
		if te := timeoutOf(ictx); te != nil {
			return fail(i, te)
		}
		return fail(i, ctx.Err())
	}
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				if stop.Load() || ctx.Err() != nil {
					return
				}
				i := int(next.Add(1) - 1)
				if i >= n {
					return
				}
				if opt.Order != nil {
					i = opt.Order[i]
				}
				select {
				case results <- result{i, one(i)}:
				case <-quit:
					return
				}
			}
		}()
	}
	finished := make(chan struct{})
	go func() {
		wg.Wait()
		close(finished)
	}()

	pending := make(map[int]T)
	want := 0
	for want < n {
		select {
		case <-ctx.Done():
			stop.Store(true)
			return ctx.Err()
		case r := <-results:
			pending[r.i] = r.v
			for {
				v, ok := pending[want]
				if !ok {
					break
				}
				delete(pending, want)
				if err := emit(want, v); err != nil {
					stop.Store(true)
					// Let the items in progress end (within their budget),
					// dropping their results.
				drain:
					for {
						select {
						case <-results:
						case <-finished:
							break drain
						}
					}
					return err
				}
				want++
			}
		case <-finished:
			// Every worker has returned; drain what they sent.
			if len(results) == 0 {
				return ctx.Err()
			}
		}
	}
	return nil
}

// isPermutation reports whether order holds each of 0..n-1 once.
func isPermutation(order []int, n int) bool {
	if len(order) != n {
		return false
	}
	seen := make([]bool, n)
	for _, i := range order {
		if i < 0 || i >= n || seen[i] {
			return false
		}
		seen[i] = true
	}
	return true
}
