package batch

import (
	"sync"
	"sync/atomic"
)

// Run computes do(0), ..., do(n-1) on up to workers goroutines and hands
// each result to emit in index order, from the calling goroutine, so emit
// needs no locking and what it writes does not depend on the number of
// workers. At most a bounded window of results (a few per worker) waits for
// an earlier one, so memory does not grow with n.
//
// When emit returns an error, Run stops handing out work, waits for the
// calls in progress and returns that error. do must not panic.
func Run[T any](n, workers int, do func(i int) T, emit func(i int, v T) error) error {
	if n <= 0 {
		return nil
	}
	workers = max(1, min(workers, n))
	type result struct {
		i int
		v T
	}
	window := 16 * workers
	tokens := make(chan struct{}, window) // one per index handed out and not yet emitted
	results := make(chan result, workers)
	var next atomic.Int64
	var stop atomic.Bool
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				tokens <- struct{}{}
				i := int(next.Add(1) - 1)
				if i >= n || stop.Load() {
					<-tokens
					return
				}
				results <- result{i, do(i)}
			}
		}()
	}
	go func() {
		wg.Wait()
		close(results)
	}()

	pending := make(map[int]T, window)
	want := 0
	var err error
	for r := range results {
		if err != nil {
			<-tokens
			continue
		}
		pending[r.i] = r.v
		for {
			v, ok := pending[want]
			if !ok {
				break
			}
			delete(pending, want)
			<-tokens
			if e := emit(want, v); e != nil {
				err = e
				stop.Store(true)
				// Release the tokens of the results already waiting.
				for range pending {
					<-tokens
				}
				clear(pending)
				break
			}
			want++
		}
	}
	return err
}
