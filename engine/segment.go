package engine

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"sync"

	"renderchain/dsp/wdf"
	"renderchain/parallel"
)

// Segmented rendering of one channel (PlanSegments, StreamWith).
const (
	// WarmupRatio is how far the slowest mode of the circuit linearised at
	// its operating point must have decayed (wdf.Solver.WarmupSamples)
	// before a segment's output is kept.
	WarmupRatio = 1e-7
	// WarmupMargin multiplies that estimate: a stage driven into hard
	// clipping forgets its start more slowly than its small-signal poles
	// say (about half as fast on the two-transistor test stage, whose
	// render needed four times the estimate; package dsp/wdf).
	WarmupMargin = 4
	// MaxWarmup bounds the warm-up, seconds; a circuit that needs longer
	// renders serially. MinSegmentWarmups already keeps the warm-ups'
	// share of the work under an eighth, so this bound is about trust, not
	// cost: a minute covers the slowest modes of the example chains but
	// the op-amp stage's (its input network needs 71 s with the margin),
	// and every join is checked against JoinTolerance.
	MaxWarmup = 60.0
	// MinSegmentWarmups is the shortest segment, in warm-ups: a segment
	// under eight warm-ups long would spend more than an eighth of its
	// work on a warm-up it throws away, so the render stays serial.
	MinSegmentWarmups = 8
	// JoinTolerance is the largest difference, in the channel's output
	// units (full scale for the output), allowed between a segment's
	// warm-up and the previous segment's output over the frames they
	// share (StreamInfo.JoinError); a render over it says so. It is a
	// quarter of the 1e-7 of full scale a segmented render must stay
	// within: on the demo at full fuzz the kept output's worst difference
	// from the serial render came to 0.8–2.6 times the join's, for
	// warm-ups from a twentieth of PlanSegments' to all of it.
	JoinTolerance = 2.5e-8
	// joinWindow is the frames at the end of a warm-up compared at a join.
	joinWindow = 256
	// MaxSegment bounds a segment's frames (16 MiB of samples): a long
	// file is cut into more segments, a multiple of the workers, so that
	// memory stays bounded whatever its length (StreamWith).
	MaxSegment = 1 << 21
)

// SegmentPlan is how a mono stream is cut for rendering on several cores:
// Segments pieces, the first First frames long and the others Length
// (the last one takes what is left), each but the first rendered from
// Warmup frames before its start by a channel fresh at the operating point
// (the resampling filters empty), whose output over those frames is
// dropped. The first piece is longer by the warm-up the others spend, so
// that every piece costs about the same. Segments 1 is a serial render,
// Reason saying why.
type SegmentPlan struct {
	Segments      int
	First, Length int
	Warmup        int
	// WarmupSeconds is Warmup at the base rate.
	WarmupSeconds float64
	Reason        string
}

// PlanSegments plans a render of frames mono frames at base rate fs and
// the given oversampling factor on up to workers cores (0: one per core).
// The warm-up is WarmupMargin times WarmupSamples(WarmupRatio) of the
// compiled solver, in base-rate frames, plus twice the resampling
// filters' delay; past MaxWarmup the plan is serial, as it is for a
// circuit with a mode that does not decay (wdf.ErrNoDecay), a single
// worker, or a file shorter than MinSegmentWarmups warm-ups per segment.
func (p *Prepared) PlanSegments(fs float64, factor int, frames int64, workers int) (SegmentPlan, error) {
	sp := SegmentPlan{Segments: 1, First: int(min(frames, math.MaxInt32))}
	workers = parallel.Workers(workers)
	if workers < 2 {
		sp.Reason = "one core"
		return sp, nil
	}
	ch, err := p.channelAt(fs, p.Circuit.Output, factor)
	if err != nil {
		return sp, err
	}
	n, err := ch.solver.WarmupSamples(WarmupRatio)
	if errors.Is(err, wdf.ErrNoDecay) {
		sp.Reason = "the circuit linearised at its operating point has a mode that does not decay, so no warm-up makes a segment forget its start"
		return sp, nil
	}
	if err != nil {
		return sp, err
	}
	w := float64(WarmupMargin)*math.Ceil(float64(n)/float64(factor)) + float64(2*ch.latency)
	sp.WarmupSeconds = w / fs
	if sp.WarmupSeconds > MaxWarmup {
		sp.Reason = fmt.Sprintf("the circuit needs %.1f s to forget its start, more than the %g s a segment may spend on it", sp.WarmupSeconds, float64(MaxWarmup))
		return sp, nil
	}
	sp.Warmup = int(w)
	rounds := int((frames + int64(workers)*MaxSegment - 1) / (int64(workers) * MaxSegment))
	for s := workers * rounds; s >= 2; s-- {
		length := int((frames - int64(sp.Warmup) + int64(s) - 1) / int64(s))
		if length >= MinSegmentWarmups*sp.Warmup && length >= MaxBlock {
			sp.Segments, sp.First, sp.Length = s, length+sp.Warmup, length
			return sp, nil
		}
	}
	sp.Reason = fmt.Sprintf("%.1f s of audio is too short to cut: each piece would need a %.2f s warm-up", float64(frames)/fs, sp.WarmupSeconds)
	return sp, nil
}

// StreamOptions tune StreamWith.
type StreamOptions struct {
	// Oversample is the channels' factor, 1…16 (0: Prepared.Oversample).
	Oversample int
	// Frames is the stream's length in frames; a mono stream is cut into
	// segments only when it is known (above 0).
	Frames int64
	// Workers bounds the segments rendered at once (0: one per core,
	// parallel.Workers; 1: serial). Stereo always runs one core per
	// channel.
	Workers int
	// In, when not nil, sees each block of input as read, in order. Sink
	// gets the output, interleaved, in order, with exactly as many frames
	// as the input. Both are called from the caller's goroutine. Progress,
	// when not nil, gets the input frames rendered so far, one call at a
	// time (from the segments' goroutines when the stream is cut).
	In, Sink func([]float64) error
	Progress func(int64)
}

// StreamWith is Stream with options: the factor, and for a mono stream of
// known length a segmented render on several cores (PlanSegments). The
// segments' outputs are joined in order; each differs from the serial
// render's by what the circuit still remembers of its start after the
// warm-up (within 1e-7 of full scale on the demo and test chains). A
// serial stream's memory is constant; a segmented one holds at most
// workers + 3 segment buffers (16 MiB each at most), reused, whatever the
// stream's length.
func (p *Prepared) StreamWith(ctx context.Context, src Source, fs float64, nc int, opt StreamOptions) (StreamInfo, error) {
	factor := opt.Oversample
	if factor == 0 {
		factor = p.Oversample
	}
	if nc != 1 || opt.Frames <= 0 {
		st, err := p.stream(ctx, src, fs, nc, factor, opt)
		st.Plan.Reason = "a stereo stream runs one core per channel"
		if nc == 1 {
			st.Plan.Reason = "the stream's length is not known"
		}
		return st, err
	}
	plan, err := p.PlanSegments(fs, factor, opt.Frames, opt.Workers)
	if err != nil {
		return StreamInfo{}, err
	}
	if plan.Segments < 2 {
		st, err := p.stream(ctx, src, fs, nc, factor, opt)
		st.Plan = plan
		return st, err
	}
	return p.segmented(ctx, src, fs, factor, plan, opt)
}

// segment is one piece of a segmented render: its input from start −
// warmup to end + lookahead (the filters' delay, or the stream's end),
// rendered in place into its output.
type segment struct {
	index              int
	start, end, warmup int64
	buf                []float64
	stats              wdf.Stats
	err                error
	done               chan struct{}
}

// segmented renders a mono stream by plan.
func (p *Prepared) segmented(ctx context.Context, src Source, fs float64, factor int, plan SegmentPlan, opt StreamOptions) (StreamInfo, error) {
	st := StreamInfo{Plan: plan}
	probe, err := p.channelAt(fs, p.Circuit.Output, factor)
	if err != nil {
		return st, err
	}
	st.States, st.NonlinearPorts = probe.States()
	lookahead := int64(probe.Latency())
	total := opt.Frames
	parent := ctx
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	var (
		wg     sync.WaitGroup
		sem    = make(chan struct{}, parallel.Workers(opt.Workers))
		mu     sync.Mutex
		frames int64
	)
	progress := func(n int) {
		if opt.Progress == nil {
			return
		}
		mu.Lock()
		frames += int64(n)
		opt.Progress(frames)
		mu.Unlock()
	}
	var segs []*segment
	for k := 0; k < plan.Segments; k++ {
		s := &segment{index: k, done: make(chan struct{})}
		s.end = int64(plan.First)
		if k > 0 {
			s.start = segs[k-1].end
			s.end = s.start + int64(plan.Length)
			s.warmup = min(int64(plan.Warmup), s.start)
		}
		if k == plan.Segments-1 || s.end > total {
			s.end = total
		}
		segs = append(segs, s)
	}
	// Segment buffers are reused: at most workers + 3 are ever made (the
	// segments started and not yet emitted, the one being read and the
	// next one's warm-up).
	size := int(max(int64(plan.First), int64(plan.Length)+int64(plan.Warmup)) + lookahead)
	free := make([][]float64, 0, cap(sem)+3)
	newBuf := func(n int64) []float64 {
		if k := len(free); k > 0 && int64(cap(free[k-1])) >= n {
			b := free[k-1]
			free = free[:k-1]
			return b[:n]
		}
		return make([]float64, n, max(n, int64(size)))
	}
	emitted := 0
	var tail []float64 // the last joinWindow frames of the previous segment's output
	emit := func(s *segment) error {
		<-s.done
		if s.err != nil {
			return s.err
		}
		out := s.buf[s.warmup : s.warmup+s.end-s.start]
		// The join: this segment's warm-up ends on frames the previous
		// segment kept; how far apart they are there is what this one
		// still remembers of its start.
		if j := min(int(s.warmup), len(tail)); j > 0 {
			warm, prev := s.buf[int(s.warmup)-j:s.warmup], tail[len(tail)-j:]
			for i := range warm {
				if d := math.Abs(warm[i] - prev[i]); !(d <= st.JoinError) {
					st.JoinError = d
				}
			}
		}
		tail = append(tail[:0], out[len(out)-min(len(out), joinWindow):]...)
		for len(out) > 0 {
			n := min(len(out), MaxBlock)
			if err := opt.Sink(out[:n]); err != nil {
				return err
			}
			out = out[n:]
		}
		st.Stats.Add(s.stats)
		free = append(free, s.buf)
		s.buf = nil
		emitted++
		return nil
	}
	fail := func(err error) (StreamInfo, error) {
		cancel()
		wg.Wait()
		if perr := parent.Err(); perr != nil {
			return st, fmt.Errorf("%w (%w)", ErrInterrupted, perr)
		}
		return st, err
	}
	// The reader: input frames in order, each copied into every segment
	// that needs it (at most two: a segment's tail is the next one's
	// warm-up).
	block := make([]float64, MaxBlock)
	var pos int64
	next := 0 // first segment not yet started
	eof := false
	for next < len(segs) {
		if err := parent.Err(); err != nil {
			return fail(err)
		}
		// Bound the memory: at most workers + 1 segments between starting
		// and emission.
		for next-emitted > cap(sem) {
			if err := emit(segs[emitted]); err != nil {
				return fail(err)
			}
		}
		var n int
		if !eof {
			var rerr error
			n, rerr = readFull(src, block)
			if rerr == io.EOF {
				eof = true
			} else if rerr != nil {
				return fail(rerr)
			}
			if n > 0 && opt.In != nil {
				if err := opt.In(block[:n]); err != nil {
					return fail(err)
				}
			}
		}
		if eof && pos+int64(n) < total {
			return fail(fmt.Errorf("the input ended at frame %d of the %d its header gives", pos+int64(n), total))
		}
		for k := next; k < len(segs); k++ {
			s := segs[k]
			lo, hi := s.start-s.warmup, min(s.end+lookahead, total)
			if lo >= pos+int64(n) {
				break
			}
			if s.buf == nil {
				s.buf = newBuf(hi - lo)
			}
			if s.buf != nil {
				a, b := max(pos, lo), min(pos+int64(n), hi)
				if b > a {
					copy(s.buf[a-lo:b-lo], block[a-pos:b-pos])
				}
			}
		}
		pos += int64(n)
		for next < len(segs) && pos >= min(segs[next].end+lookahead, total) {
			s := segs[next]
			last := next == len(segs)-1
			sem <- struct{}{}
			wg.Add(1)
			go func() {
				defer wg.Done()
				defer func() { <-sem }()
				defer close(s.done)
				s.stats, s.err = p.renderSegment(ctx, s, fs, factor, last, progress)
			}()
			next++
		}
	}
	if pos < total {
		return fail(fmt.Errorf("the input holds %d frames, not the %d its header gives", pos, total))
	}
	for emitted < len(segs) {
		if err := emit(segs[emitted]); err != nil {
			return fail(err)
		}
	}
	wg.Wait()
	return st, nil
}

// renderSegment renders one segment in place: a fresh channel over the
// warm-up, then the kept frames, then the look-ahead (or, for the last
// segment, the filters' flush). Its statistics count the kept frames'
// work only (and the flush's, for the last); the most iterations spent on
// one sample include the warm-up's.
func (p *Prepared) renderSegment(ctx context.Context, s *segment, fs float64, factor int, last bool, progress func(int)) (wdf.Stats, error) {
	ch, err := p.channelAt(fs, p.Circuit.Output, factor)
	if err != nil {
		return wdf.Stats{}, err
	}
	out := make([]float64, MaxBlock)
	warm, keep := int(s.warmup), int(s.warmup+s.end-s.start)
	var before, kept wdf.Stats // at the end of the warm-up and of the kept frames
	got := 0
	for pos := 0; pos < len(s.buf); {
		if err := ctx.Err(); err != nil {
			return wdf.Stats{}, err
		}
		// Blocks end where the warm-up and the kept frames do, so that the
		// statistics can be read there.
		n := min(MaxBlock, len(s.buf)-pos)
		if pos < warm {
			n = min(n, warm-pos)
		} else if pos < keep {
			n = min(n, keep-pos)
		}
		k := ch.Process(out, s.buf[pos:pos+n])
		copy(s.buf[got:], out[:k]) // the output lags the input: frames not yet read stay intact
		got += k
		pos += n
		if pos == warm {
			before = ch.Stats()
		}
		if pos > warm && pos <= keep {
			progress(n)
		}
		if pos == keep {
			kept = ch.Stats()
		}
	}
	if last {
		for {
			k := ch.Flush(out)
			if k == 0 {
				break
			}
			copy(s.buf[got:], out[:k])
			got += k
		}
		kept = ch.Stats()
	}
	return wdf.Stats{Samples: kept.Samples - before.Samples, Iterations: kept.Iterations - before.Iterations,
		Fallbacks: kept.Fallbacks - before.Fallbacks, NonConverged: kept.NonConverged - before.NonConverged,
		MaxIterations: ch.Stats().MaxIterations}, nil
}

// readFull reads into buf until it is full or the source ends (io.EOF,
// with the frames read before it).
func readFull(src Source, buf []float64) (int, error) {
	n := 0
	for n < len(buf) {
		k, err := src.Read(buf[n:])
		n += k
		if err != nil {
			return n, err
		}
		if k == 0 {
			return n, io.ErrNoProgress
		}
	}
	return n, nil
}
