// Package par runs independent work items (k-points, grid points) on a fixed number of
// goroutines. Each item writes only its own output slot, so results never depend on the number
// of workers or on scheduling; reductions are left to the caller, who sums in index order.
package par

import (
	"context"
	"runtime"
	"sync"
	"sync/atomic"
)

// Workers returns the number of goroutines to use for n items when the caller asked for w:
// w <= 0 means GOMAXPROCS; the result is at least 1 and at most n (or 1 when n < 1).
func Workers(w, n int) int {
	if w <= 0 {
		w = runtime.GOMAXPROCS(0)
	}
	return max(1, min(w, n))
}

// For calls f(worker, i) for every i in [0, n) on Workers(workers, n) goroutines. worker is in
// [0, Workers(workers, n)) and identifies per-goroutine scratch space. It stops handing out
// items once ctx is done or an f returns an error, and returns the error of the lowest failing
// index (so the reported error does not depend on scheduling), else ctx.Err().
func For(ctx context.Context, workers, n int, f func(worker, i int) error) error {
	if n <= 0 {
		return ctx.Err()
	}
	workers = Workers(workers, n)
	if workers == 1 {
		for i := 0; i < n; i++ {
			if err := ctx.Err(); err != nil {
				return err
			}
			if err := f(0, i); err != nil {
				return err
			}
		}
		return ctx.Err()
	}
	var (
		next   atomic.Int64
		stop   atomic.Bool
		mu     sync.Mutex
		errIdx = n
		first  error
		wg     sync.WaitGroup
	)
	for w := range workers {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= n || stop.Load() || ctx.Err() != nil {
					return
				}
				if err := f(w, i); err != nil {
					mu.Lock()
					if i < errIdx {
						errIdx, first = i, err
					}
					mu.Unlock()
					stop.Store(true)
				}
			}
		})
	}
	wg.Wait()
	if first != nil {
		return first
	}
	return ctx.Err()
}
