// Package parallel runs the independent jobs of a command (the steps of a
// sweep, the trials of a Monte Carlo run, the variants of an A/B set, the
// takes of the demo) on a bounded number of goroutines.
//
// For(ctx, n, workers, f) calls f(ctx, i) once for each i in [0, n), at
// most workers at a time (0 or less: one per core, runtime.GOMAXPROCS). The
// first failure stops the start of new jobs and cancels the context the
// running ones see. The error returned is the caller's context's error if
// that ended; otherwise the error of the lowest index that failed for a
// reason of its own (not because the pool cancelled it), so the outcome
// does not depend on scheduling. Jobs write their results into slots of
// their own index, so results come back in order whatever the workers.
//
// It is built on golang.org/x/sync/errgroup (Group.SetLimit).
//
// Non-goals: work stealing, priorities, results over channels.
package parallel
