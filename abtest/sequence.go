package abtest

import (
	"errors"
	"fmt"
	"io"
	"math"

	"renderchain/dsp/wavio"
	"renderchain/report"
)

// Defaults of the sequence file.
const (
	DefaultSegment   = 4.0   // s
	DefaultCrossfade = 0.020 // s
	DefaultRounds    = 2
	SequenceFile     = "sequence.wav"
)

// SequenceOptions shape the sequence file: the clips back to back in a
// repeating order, every segment taken from the same point of the phrase.
type SequenceOptions struct {
	Off       bool    // no sequence file
	Segment   float64 // segment length, s (> 0)
	Crossfade float64 // equal-power crossfade, s (0 ≤ 2·Crossfade ≤ Segment)
	Start     float64 // where in the take every segment starts, s (≥ 0)
	Rounds    int     // times through Order (≥ 1)
	// Order lists the clips of one round by label (case-insensitive) or by
	// 1-based position (variants in the order given, the bypass last).
	// Empty: every clip once, in the set's order.
	Order []string
}

// Sequence describes the sequence file written, in frames of the take's
// sample rate. With S = SegmentFrames, F = CrossfadeFrames, P =
// PhraseStartFrame and K = len(Segments), the file holds K·S + F frames and
// output frame n = k·S + j (0 ≤ j < S) is
//
//	j ≥ F:  c_k[P + j]
//	j < F:  sin θ_j · c_k[P + j]  +  cos θ_j · c_{k−1}[P + S + j],  θ_j = (π/2)(j + ½)/F
//
// times the sequence gain, where c_k is segment k's clip (as written to its
// own file) and a term whose segment does not exist (k = 0, k = K) is 0:
// the first segment fades in from silence and the last fades out over the
// final F frames. Each segment thus plays its clip from the same phrase
// frame P, keeps playing S + F frames and overlaps the next segment by F.
type Sequence struct {
	File             string       `json:"file"`
	Order            []string     `json:"order"` // labels of one round
	Rounds           int          `json:"rounds"`
	SegmentFrames    int64        `json:"segment_frames"`
	CrossfadeFrames  int64        `json:"crossfade_frames"`
	PhraseStartFrame int64        `json:"phrase_start_frame"`
	Frames           int64        `json:"frames"`
	SegmentSeconds   float64      `json:"segment_s"`
	CrossfadeSeconds float64      `json:"crossfade_s"`
	StartSeconds     float64      `json:"phrase_start_s"`
	GainDB           report.Level `json:"gain_db"` // applied to the whole file; 0 unless crossfades would pass the ceiling
	TruePeakDBTP     report.Level `json:"true_peak_dbtp"`
	Segments         []Segment    `json:"segments"`
}

// Segment is one segment of the sequence file.
type Segment struct {
	Label      string  `json:"label"`
	File       string  `json:"file"`        // the clip it plays
	StartFrame int64   `json:"start_frame"` // k·S: its fade-in begins here
	StartS     float64 `json:"start_s"`
}

// seqPlan is the sample arithmetic of a sequence.
type seqPlan struct {
	S, F, P int64
	clips   []int // clip index per segment
}

func (p seqPlan) frames() int64 { return int64(len(p.clips))*p.S + p.F }

// planSequence converts the options to frames (rounding to the nearest
// frame) and checks them against a take of n frames.
func planSequence(o SequenceOptions, fs float64, n int64, dry string, round []int) (seqPlan, error) {
	switch {
	case !(o.Segment > 0) || math.IsInf(o.Segment, 0):
		return seqPlan{}, paramErr("segment", fmt.Sprintf("%gs", o.Segment), "a length above 0 s")
	case !(o.Crossfade >= 0) || 2*o.Crossfade > o.Segment:
		return seqPlan{}, paramErr("crossfade", fmt.Sprintf("%gs", o.Crossfade), fmt.Sprintf("0 s to half the segment (%gs)", o.Segment/2))
	case !(o.Start >= 0) || math.IsInf(o.Start, 0):
		return seqPlan{}, paramErr("segment_start", fmt.Sprintf("%gs", o.Start), "0 s or later")
	case o.Rounds < 1 || o.Rounds > 1000:
		return seqPlan{}, paramErr("rounds", fmt.Sprint(o.Rounds), "1…1000")
	}
	p := seqPlan{S: int64(math.Round(o.Segment * fs)), F: int64(math.Round(o.Crossfade * fs)), P: int64(math.Round(o.Start * fs))}
	if p.S < 1 {
		return seqPlan{}, paramErr("segment", fmt.Sprintf("%gs", o.Segment), "at least one frame")
	}
	if 2*p.F > p.S {
		p.F = p.S / 2
	}
	if need := p.P + p.S + p.F; need > n {
		return seqPlan{}, &ShortTakeError{File: dry, Seconds: float64(n) / fs, Need: float64(need) / fs,
			Why: fmt.Sprintf("one %gs segment with its %gs crossfade from %gs in", o.Segment, o.Crossfade, o.Start)}
	}
	for r := 0; r < o.Rounds; r++ {
		p.clips = append(p.clips, round...)
	}
	return p, nil
}

// clipReader reads whole frames from a clip file.
type clipReader struct {
	f    *wavio.File
	path string
}

// openAt opens a clip and skips its first skip frames.
func openAt(path string, skip int64, nc int, scratch []float64) (*clipReader, error) {
	f, err := wavio.Open(path)
	if err != nil {
		return nil, err
	}
	r := &clipReader{f: f, path: path}
	for skip > 0 {
		k := int64(len(scratch) / nc)
		if k > skip {
			k = skip
		}
		if err := r.read(scratch[:k*int64(nc)]); err != nil {
			f.Close()
			return nil, err
		}
		skip -= k
	}
	return r, nil
}

// read fills dst or fails.
func (r *clipReader) read(dst []float64) error {
	n, err := r.f.Read(dst)
	if n == len(dst) {
		return nil
	}
	if err == nil || errors.Is(err, io.EOF) {
		err = fmt.Errorf("%s: ends early (wanted %d more samples)", r.path, len(dst)-n)
	}
	return err
}

func (r *clipReader) close() {
	if r != nil {
		r.f.Close()
	}
}

// seqBlock is the block size of the sequence writer, in frames.
const seqBlock = 4096

// writeSequence streams the sequence of plan p, whose segment k plays the
// clip file paths[p.clips[k]], block by block into sink. At most two clip
// files are open at a time.
func writeSequence(p seqPlan, paths []string, nc int, sink func([]float64) error) error {
	a := make([]float64, seqBlock*nc)
	b := make([]float64, seqBlock*nc)
	out := make([]float64, seqBlock*nc)
	var prev *clipReader
	defer func() { prev.close() }()
	fadeIn, fadeOut := (*Fade)(nil), (*Fade)(nil)
	if p.F > 0 {
		fadeIn, _ = NewFade(p.F, nc, false)
		fadeOut, _ = NewFade(p.F, nc, true)
	}
	K := len(p.clips)
	for k := 0; k <= K; k++ {
		var cur *clipReader
		if k < K {
			var err error
			if cur, err = openAt(paths[p.clips[k]], p.P, nc, a); err != nil {
				return err
			}
		}
		if p.F > 0 {
			fadeIn.Reset()
			fadeOut.Reset()
		}
		for j := int64(0); j < p.F; j += seqBlock {
			n := int(min(seqBlock, p.F-j)) * nc
			clear(out[:n])
			if prev != nil {
				if err := prev.read(a[:n]); err != nil {
					cur.close()
					return err
				}
				fadeOut.Process(a[:n], a[:n])
				for i, v := range a[:n] {
					out[i] += v
				}
			}
			if cur != nil {
				if err := cur.read(b[:n]); err != nil {
					cur.close()
					return err
				}
				fadeIn.Process(b[:n], b[:n])
				for i, v := range b[:n] {
					out[i] += v
				}
			}
			if err := sink(out[:n]); err != nil {
				cur.close()
				return err
			}
		}
		prev.close()
		prev = cur
		if cur == nil {
			break
		}
		for j := p.F; j < p.S; j += seqBlock {
			n := int(min(seqBlock, p.S-j)) * nc
			if err := cur.read(out[:n]); err != nil {
				return err
			}
			if err := sink(out[:n]); err != nil {
				return err
			}
		}
	}
	return nil
}
