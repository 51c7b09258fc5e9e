package wavio

import (
	"bytes"
	"errors"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"syscall"
	"testing"
)

// onlyWriter hides every method but Write, as a pipe would.
type onlyWriter struct{ w io.Writer }

func (o onlyWriter) Write(p []byte) (int, error) { return o.w.Write(p) }

// A stream writer's bytes equal the seeking writer's, for every header
// form (plain PCM, plain float with fact, EXTENSIBLE) and an odd data
// length: the sizes it announces up front are the ones Close would patch.
func TestStreamWriterMatchesSeeking(t *testing.T) {
	for _, f := range []Format{
		{SampleRate: 44100, Channels: 2, BitDepth: 16},
		{SampleRate: 48000, Channels: 1, BitDepth: 32, Float: true},
		{SampleRate: 48000, Channels: 1, BitDepth: 24}, // odd data length: pad byte
		{SampleRate: 96000, Channels: 3, BitDepth: 64, Float: true},
	} {
		frames := 7
		src := make([]float64, frames*f.Channels)
		for i := range src {
			src[i] = 0.9 * math.Sin(float64(i))
		}
		var seek memWS
		w, err := NewWriter(&seek, f)
		if err != nil {
			t.Fatal(err)
		}
		w.Write(src)
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		var stream bytes.Buffer
		sw, err := NewStreamWriter(onlyWriter{&stream}, f, int64(frames))
		if err != nil {
			t.Fatal(err)
		}
		sw.Write(src[:3*f.Channels])
		sw.Write(src[3*f.Channels:])
		if err := sw.Close(); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(stream.Bytes(), seek.b) {
			t.Errorf("%v: stream bytes differ from the seeking writer's\n%x\n%x", f, stream.Bytes()[:64], seek.b[:64])
		}
	}
}

// A stream writer refuses frames beyond its announcement and reports a
// short stream on Close.
func TestStreamWriterCount(t *testing.T) {
	f := Format{SampleRate: 48000, Channels: 2, BitDepth: 16}
	var b bytes.Buffer
	w, err := NewStreamWriter(&b, f, 2)
	if err != nil {
		t.Fatal(err)
	}
	before := b.Len()
	if err := w.Write(make([]float64, 6)); !errors.Is(err, ErrFrameCount) || b.Len() != before {
		t.Errorf("3 frames into 2: %v, wrote %d bytes", err, b.Len()-before)
	}
	w.Write(make([]float64, 2))
	if err := w.Close(); !errors.Is(err, ErrFrameCount) {
		t.Errorf("Close after 1 of 2 frames = %v, want ErrFrameCount", err)
	}
	if _, err := NewStreamWriter(&b, f, -1); err == nil {
		t.Error("negative frame count accepted")
	}
	if _, err := NewStreamWriter(&b, f, 1<<31); !errors.Is(err, ErrTooLarge) {
		t.Errorf("2^31 stereo 16-bit frames (8 GiB) = %v, want ErrTooLarge", err)
	}
}

// WriteFile into a FIFO writes a whole WAV stream into it (in place); the
// reader at the other end decodes it exactly and the FIFO stays a FIFO.
func TestWriteFileFIFO(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skip("mkfifo:", err)
	}
	type result struct {
		b   []byte
		err error
	}
	got := make(chan result)
	go func() {
		f, err := os.Open(fifo)
		if err != nil {
			got <- result{nil, err}
			return
		}
		b, err := io.ReadAll(f)
		f.Close()
		got <- result{b, err}
	}()
	x := []float64{0, 0.5, -0.5, 0.25} // exact 16-bit codes
	if err := WriteFile(fifo, Format{SampleRate: 48000, Channels: 1, BitDepth: 16}, x); err != nil {
		t.Fatal(err)
	}
	res := <-got
	if res.err != nil {
		t.Fatal(res.err)
	}
	r, err := NewReader(bytes.NewReader(res.b))
	if err != nil {
		t.Fatal(err)
	}
	y, err := readAll(t, r, 16)
	if err != nil || len(y) != len(x) {
		t.Fatalf("read back %v, %v", y, err)
	}
	for i := range x {
		if y[i] != x[i] {
			t.Errorf("sample %d = %g, want %g", i, y[i], x[i])
		}
	}
	if st, err := os.Lstat(fifo); err != nil || st.Mode()&fs.ModeNamedPipe == 0 {
		t.Errorf("the FIFO was replaced: %v", err)
	}
}
