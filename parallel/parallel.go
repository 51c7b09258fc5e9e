package parallel

import (
	"context"
	"errors"
	"runtime"

	"golang.org/x/sync/errgroup"
)

// Workers resolves a worker count: n when above 0, else one per core.
func Workers(n int) int {
	if n > 0 {
		return n
	}
	return runtime.GOMAXPROCS(0)
}

// For calls f(ctx, i) for every i in [0, n) on at most workers goroutines
// (see the package documentation for the error rule).
func For(ctx context.Context, n, workers int, f func(ctx context.Context, i int) error) error {
	if n <= 0 {
		return ctx.Err()
	}
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(min(Workers(workers), n))
	errs := make([]error, n)
	for i := 0; i < n; i++ {
		if gctx.Err() != nil {
			break
		}
		g.Go(func() error {
			if err := gctx.Err(); err != nil {
				return err
			}
			errs[i] = f(gctx, i)
			return errs[i]
		})
	}
	g.Wait()
	if err := ctx.Err(); err != nil {
		return err
	}
	var cancelled error
	for _, err := range errs {
		switch {
		case err == nil:
		case errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded):
			if cancelled == nil {
				cancelled = err
			}
		default:
			return err
		}
	}
	return cancelled
}
