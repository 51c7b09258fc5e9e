package parallel

import (
	"context"
	"errors"
	"fmt"
	"sync/atomic"
	"testing"
	"time"
)

// Every index runs once, never more than the limit at a time, results land
// in their own slots.
func TestForRunsEachOnceWithinLimit(t *testing.T) {
	for _, workers := range []int{0, 1, 3, 50} {
		var live, most atomic.Int64
		out := make([]int, 40)
		err := For(context.Background(), len(out), workers, func(_ context.Context, i int) error {
			n := live.Add(1)
			for {
				m := most.Load()
				if n <= m || most.CompareAndSwap(m, n) {
					break
				}
			}
			time.Sleep(time.Millisecond)
			out[i] += i * i
			live.Add(-1)
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		for i, v := range out {
			if v != i*i {
				t.Fatalf("workers %d: slot %d = %d", workers, i, v)
			}
		}
		if limit := int64(Workers(workers)); most.Load() > limit {
			t.Errorf("workers %d: %d ran at once", workers, most.Load())
		}
	}
}

// The lowest failing index wins, whatever finishes first; jobs cancelled
// by the failure do not mask it.
func TestForFirstErrorInOrder(t *testing.T) {
	err := For(context.Background(), 8, 8, func(ctx context.Context, i int) error {
		switch i {
		case 2:
			time.Sleep(20 * time.Millisecond)
			return fmt.Errorf("job %d failed", i)
		case 5:
			return fmt.Errorf("job %d failed", i)
		}
		<-ctx.Done()
		return ctx.Err()
	})
	if err == nil || err.Error() != "job 2 failed" {
		t.Errorf("got %v, want job 2's error", err)
	}
}

// The caller's cancellation is reported as such, and no new job starts.
func TestForCallerCancels(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	var started atomic.Int64
	err := For(ctx, 100, 2, func(ctx context.Context, i int) error {
		if started.Add(1) == 3 {
			cancel()
		}
		return nil
	})
	if !errors.Is(err, context.Canceled) || started.Load() > 5 {
		t.Errorf("err %v after %d jobs", err, started.Load())
	}
}
