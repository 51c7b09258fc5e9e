package engine

import (
	"context"
	"errors"
	"fmt"
	"io"
	"sync"

	"renderchain/dsp/wdf"
)

// Source is a stream of interleaved samples, such as a *wavio.File.
type Source interface {
	Read(dst []float64) (int, error) // io.EOF when done
}

// ErrInterrupted reports a run stopped by its context; the error returned
// wraps the context's error too.
var ErrInterrupted = errors.New("interrupted")

// Stream runs an interleaved stream of nc channels through the prepared
// chain at base rate fs, one circuit per channel, and hands every block of
// interleaved output to sink together with the matching input frames'
// count (the output lines up with the input sample for sample, and over
// the stream has exactly as many frames). in, when not nil, sees each block
// of input as read. progress, when not nil, gets the input frames done.
// Memory is constant: blocks of MaxBlock frames.
func (p *Prepared) Stream(ctx context.Context, src Source, fs float64, nc int, in, sink func([]float64) error, progress func(int64)) (StreamInfo, error) {
	return p.stream(ctx, src, fs, nc, p.Oversample, StreamOptions{In: in, Sink: sink, Progress: progress})
}

// stream is the serial render of Stream and StreamWith at the factor given.
func (p *Prepared) stream(ctx context.Context, src Source, fs float64, nc, factor int, opt StreamOptions) (StreamInfo, error) {
	st := StreamInfo{Plan: SegmentPlan{Segments: 1}}
	in, sink, progress := opt.In, opt.Sink, opt.Progress
	chans := make([]*Channel, nc)
	for c := range chans {
		var err error
		if chans[c], err = p.channelAt(fs, p.Circuit.Output, factor); err != nil {
			return st, err
		}
	}
	st.States, st.NonlinearPorts = chans[0].States()
	inter := make([]float64, MaxBlock*nc)
	outInter := make([]float64, MaxBlock*nc)
	chIn := make([][]float64, nc)
	chOut := make([][]float64, nc)
	for c := range chIn {
		chIn[c] = make([]float64, MaxBlock)
		chOut[c] = make([]float64, MaxBlock)
	}
	emit := func(n int) error {
		for c := 0; c < nc; c++ {
			for i := 0; i < n; i++ {
				outInter[i*nc+c] = chOut[c][i]
			}
		}
		return sink(outInter[:n*nc])
	}
	counts := make([]int, nc)
	var done int64
	for {
		if err := ctx.Err(); err != nil {
			return st, fmt.Errorf("%w (%w)", ErrInterrupted, err)
		}
		n, rerr := src.Read(inter)
		if n > 0 {
			if in != nil {
				if err := in(inter[:n]); err != nil {
					return st, err
				}
			}
			frames := n / nc
			for c := 0; c < nc; c++ {
				for i := 0; i < frames; i++ {
					chIn[c][i] = inter[i*nc+c]
				}
			}
			got := processChannels(chans, chOut, chIn, frames, counts)
			if err := emit(got); err != nil {
				return st, err
			}
			done += int64(frames)
			if progress != nil {
				progress(done)
			}
		}
		if rerr == io.EOF {
			break
		}
		if rerr != nil {
			return st, rerr
		}
	}
	for {
		got := 0
		for c := 0; c < nc; c++ {
			got = chans[c].Flush(chOut[c])
		}
		if got == 0 {
			break
		}
		if err := emit(got); err != nil {
			return st, err
		}
	}
	for _, c := range chans {
		st.Stats.Add(c.Stats())
	}
	return st, nil
}

// processChannels runs one block through every channel, each channel on
// its own goroutine when there are several (channels share nothing), and
// returns the samples each produced (the same for all).
func processChannels(chans []*Channel, out, in [][]float64, frames int, got []int) int {
	if len(chans) == 1 {
		return chans[0].Process(out[0], in[0][:frames])
	}
	var wg sync.WaitGroup
	for c := range chans {
		wg.Add(1)
		go func(c int) {
			defer wg.Done()
			got[c] = chans[c].Process(out[c], in[c][:frames])
		}(c)
	}
	wg.Wait()
	return got[0]
}

// StreamInfo describes a finished Stream: the channels' summed Newton
// statistics, the size of the compiled circuit and how the work was cut
// (Plan.Segments 1: serial).
type StreamInfo struct {
	Stats          wdf.Stats
	States         int // reactive states
	NonlinearPorts int // device ports at the root
	Plan           SegmentPlan
	// JoinError is, for a segmented stream, the largest difference between
	// a segment's warm-up and the previous segment's output over the last
	// frames (up to 256) before the segment's start: an estimate of how
	// far the kept output can be from the serial render's at the join,
	// to hold under JoinTolerance. 0 for a serial stream.
	JoinError float64
}
