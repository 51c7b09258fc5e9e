package abtest

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"
)

// browserPath is where the Debian package "chromium" puts its launcher.
const browserPath = "/usr/bin/chromium"

// debugMsg is a message of the browser's remote-debugging protocol: a
// response (ID set) or an event (Method set).
type debugMsg struct {
	ID        int             `json:"id,omitempty"`
	Method    string          `json:"method,omitempty"`
	SessionID string          `json:"sessionId,omitempty"`
	Params    json.RawMessage `json:"params,omitempty"`
	Result    json.RawMessage `json:"result,omitempty"`
	Error     *struct {
		Code    int    `json:"code"`
		Message string `json:"message"`
	} `json:"error,omitempty"`
}

// browser drives a headless browser over --remote-debugging-pipe: the
// browser reads NUL-terminated JSON messages on fd 3 and writes them on fd 4.
type browser struct {
	cmd     *exec.Cmd
	in      io.WriteCloser
	mu      sync.Mutex
	next    int
	pending map[int]chan debugMsg
	events  []debugMsg
	stderr  strings.Builder
}

func startBrowser(t *testing.T) *browser {
	t.Helper()
	if _, err := os.Stat(browserPath); err != nil {
		t.Skipf("browser test skipped: %s not found (install the Debian package chromium to run it)", browserPath)
	}
	toBrowser, browserIn, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	browserOut, fromBrowser, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	b := &browser{in: browserIn, pending: map[int]chan debugMsg{}}
	cmd := exec.Command(browserPath,
		"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--disable-dev-shm-usage", "--no-default-browser-check", "--mute-audio",
		"--autoplay-policy=no-user-gesture-required",
		"--user-data-dir="+t.TempDir(), "--remote-debugging-pipe", "about:blank")
	cmd.ExtraFiles = []*os.File{toBrowser, fromBrowser} // fd 3, fd 4
	cmd.Stderr = &b.stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	toBrowser.Close()
	fromBrowser.Close()
	b.cmd = cmd
	go b.readLoop(browserOut)
	t.Cleanup(func() { b.close() })
	return b
}

func (b *browser) readLoop(r io.ReadCloser) {
	defer r.Close()
	br := bufio.NewReaderSize(r, 1<<20)
	for {
		raw, err := br.ReadBytes(0)
		if err != nil {
			b.mu.Lock()
			for id, ch := range b.pending {
				close(ch)
				delete(b.pending, id)
			}
			b.mu.Unlock()
			return
		}
		var m debugMsg
		if json.Unmarshal(raw[:len(raw)-1], &m) != nil {
			continue
		}
		b.mu.Lock()
		if m.ID != 0 {
			if ch, ok := b.pending[m.ID]; ok {
				ch <- m
				delete(b.pending, m.ID)
			}
		} else {
			b.events = append(b.events, m)
		}
		b.mu.Unlock()
	}
}

// call sends one command and waits for its response.
func (b *browser) call(ctx context.Context, session, method string, params any) (json.RawMessage, error) {
	b.mu.Lock()
	b.next++
	id := b.next
	ch := make(chan debugMsg, 1)
	b.pending[id] = ch
	b.mu.Unlock()
	if params == nil {
		params = struct{}{}
	}
	msg, err := json.Marshal(map[string]any{"id": id, "method": method, "params": params, "sessionId": session})
	if err != nil {
		return nil, err
	}
	if session == "" {
		msg, _ = json.Marshal(map[string]any{"id": id, "method": method, "params": params})
	}
	if _, err := b.in.Write(append(msg, 0)); err != nil {
		return nil, fmt.Errorf("%s: %w", method, err)
	}
	select {
	case m, ok := <-ch:
		if !ok {
			return nil, fmt.Errorf("%s: browser closed the pipe (stderr: %s)", method, b.stderr.String())
		}
		if m.Error != nil {
			return nil, fmt.Errorf("%s: %s", method, m.Error.Message)
		}
		return m.Result, nil
	case <-ctx.Done():
		return nil, fmt.Errorf("%s: %w", method, ctx.Err())
	}
}

// waitEvent waits for an event of the given method in a session.
func (b *browser) waitEvent(ctx context.Context, session, method string) error {
	for {
		b.mu.Lock()
		for _, e := range b.events {
			if e.Method == method && e.SessionID == session {
				b.mu.Unlock()
				return nil
			}
		}
		b.mu.Unlock()
		select {
		case <-ctx.Done():
			return fmt.Errorf("waiting for %s: %w", method, ctx.Err())
		case <-time.After(20 * time.Millisecond):
		}
	}
}

func (b *browser) close() {
	if b.cmd == nil || b.cmd.Process == nil {
		return
	}
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Second)
	b.call(ctx, "", "Browser.close", nil)
	cancel()
	b.in.Close()
	done := make(chan struct{})
	go func() { b.cmd.Wait(); close(done) }()
	select {
	case <-done:
	case <-time.After(5 * time.Second):
		b.cmd.Process.Kill()
		<-done
	}
	b.cmd = nil
}

// pageReport is what the browser saw of a page.
type pageReport struct {
	SelfTest struct {
		OK    bool `json:"ok"`
		Clips []struct {
			Src      string  `json:"src"`
			State    string  `json:"state"`
			Duration float64 `json:"duration"`
			Error    int     `json:"error"`
		} `json:"clips"`
		Switches []struct {
			From       int     `json:"from"`
			To         int     `json:"to"`
			Before     float64 `json:"before"`
			After      float64 `json:"after"`
			FromPaused bool    `json:"from_paused"`
			Playing    bool    `json:"playing"`
			Later      float64 `json:"later"`
		} `json:"switches"`
		Images []struct {
			Src      string  `json:"src"`
			Complete bool    `json:"complete"`
			Width    int     `json:"width"`
			Shown    float64 `json:"shown"`
		} `json:"images"`
	}
	Problems []string // console errors, exceptions, failed loads
	Requests []string // every URL the page asked for
}

// openPage loads a page in a fresh tab, runs its self-test and, if extra is
// set, evaluates it and returns its string value too.
func (b *browser) openPage(ctx context.Context, path, extra string) (*pageReport, string, error) {
	res, err := b.call(ctx, "", "Target.createTarget", map[string]any{"url": "about:blank"})
	if err != nil {
		return nil, "", err
	}
	var tgt struct {
		TargetID string `json:"targetId"`
	}
	json.Unmarshal(res, &tgt)
	res, err = b.call(ctx, "", "Target.attachToTarget", map[string]any{"targetId": tgt.TargetID, "flatten": true})
	if err != nil {
		return nil, "", err
	}
	var att struct {
		SessionID string `json:"sessionId"`
	}
	json.Unmarshal(res, &att)
	s := att.SessionID
	for _, m := range []string{"Runtime.enable", "Log.enable", "Network.enable", "Page.enable"} {
		if _, err := b.call(ctx, s, m, nil); err != nil {
			return nil, "", err
		}
	}
	abs, _ := filepath.Abs(path)
	u := url.URL{Scheme: "file", Path: abs}
	if _, err := b.call(ctx, s, "Page.navigate", map[string]any{"url": u.String()}); err != nil {
		return nil, "", err
	}
	if err := b.waitEvent(ctx, s, "Page.loadEventFired"); err != nil {
		return nil, "", err
	}
	eval := func(expr string) (json.RawMessage, error) {
		res, err := b.call(ctx, s, "Runtime.evaluate", map[string]any{"expression": expr, "awaitPromise": true, "returnByValue": true})
		if err != nil {
			return nil, err
		}
		var r struct {
			Result struct {
				Value json.RawMessage `json:"value"`
			} `json:"result"`
			ExceptionDetails *struct {
				Text      string `json:"text"`
				Exception struct {
					Description string `json:"description"`
				} `json:"exception"`
			} `json:"exceptionDetails"`
		}
		if err := json.Unmarshal(res, &r); err != nil {
			return nil, err
		}
		if r.ExceptionDetails != nil {
			return nil, errors.New("page script threw: " + r.ExceptionDetails.Text + " " + r.ExceptionDetails.Exception.Description)
		}
		return r.Result.Value, nil
	}
	rep := &pageReport{}
	v, err := eval("abPage.selfTest()")
	if err != nil {
		return nil, "", err
	}
	if err := json.Unmarshal(v, &rep.SelfTest); err != nil {
		return nil, "", fmt.Errorf("self-test result %s: %w", v, err)
	}
	extraOut := ""
	if extra != "" {
		v, err := eval(extra)
		if err != nil {
			return nil, "", err
		}
		json.Unmarshal(v, &extraOut)
	}
	// Let late events (failed loads) arrive.
	time.Sleep(200 * time.Millisecond)
	b.mu.Lock()
	defer b.mu.Unlock()
	for _, e := range b.events {
		if e.SessionID != s {
			continue
		}
		switch e.Method {
		case "Runtime.exceptionThrown":
			rep.Problems = append(rep.Problems, "exception: "+string(e.Params))
		case "Runtime.consoleAPICalled":
			var p struct {
				Type string `json:"type"`
			}
			json.Unmarshal(e.Params, &p)
			if p.Type == "error" || p.Type == "assert" || p.Type == "warning" {
				rep.Problems = append(rep.Problems, "console "+p.Type+": "+string(e.Params))
			}
		case "Log.entryAdded":
			var p struct {
				Entry struct {
					Level, Text, URL string
				} `json:"entry"`
			}
			json.Unmarshal(e.Params, &p)
			if p.Entry.Level == "error" {
				rep.Problems = append(rep.Problems, "log: "+p.Entry.Text+" "+p.Entry.URL)
			}
		case "Network.loadingFailed":
			rep.Problems = append(rep.Problems, "load failed: "+string(e.Params))
		case "Network.requestWillBeSent":
			var p struct {
				Request struct {
					URL string `json:"url"`
				} `json:"request"`
			}
			json.Unmarshal(e.Params, &p)
			rep.Requests = append(rep.Requests, p.Request.URL)
		}
	}
	return rep, extraOut, nil
}

// writePNG writes a small test picture.
func writePNG(t *testing.T, path string) {
	t.Helper()
	img := image.NewRGBA(image.Rect(0, 0, 8, 6))
	for i := 0; i < 8; i++ {
		img.Set(i, i%6, color.RGBA{R: 200, A: 255})
	}
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := png.Encode(f, img); err != nil {
		t.Fatal(err)
	}
}

// TestPageInBrowser opens the listening pages of a plain and of a blind set
// in a headless browser and checks, from the browser's own reports: the page
// loads without console errors, exceptions or failed loads; it requests
// nothing but file: URLs inside the set's folder (it works offline); every
// player has a source that loads (metadata read, duration within 1 ms of
// the clip's); switching clips keeps the playback position (the new clip's
// currentTime right after the switch within 50 ms of the old clip's, the old
// one paused, the new one playing on); the plot image loads; the plain
// set's four pictures load at their files' pixel widths and show at least
// 700 px wide in the browser's default 800-px window; and, for the blind
// set (which gets no pictures), loading the key reveals every label.
func TestPageInBrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("browser test skipped in -short mode")
	}
	if _, err := os.Stat(browserPath); err != nil {
		t.Skipf("browser test skipped: %s not found (install the Debian package chromium to run it)", browserPath)
	}
	dir := t.TempDir()
	dry := makeDry(t, dir, 2.0, 2)
	ch, chPath := fuzzChain(t)
	plots := filepath.Join(dir, "plots")
	os.Mkdir(plots, 0o755)
	writePNG(t, filepath.Join(plots, "more-fuzz.response.png"))
	base := Options{Chain: ch, ChainPath: chPath, Dry: dry, Oversample: 2,
		TargetLUFS: DefaultTargetLUFS, CeilingDBTP: DefaultCeilingDBTP, PlotDir: plots,
		Variants: []Variant{{Label: "as built"}, {Label: "more fuzz", Settings: []string{"fuzz.fuzz=1"}}},
		Sequence: SequenceOptions{Segment: 0.5, Crossfade: 0.01, Rounds: 1}, Pictures: PictureOptions{On: true}}
	plain := base
	plain.OutDir = filepath.Join(dir, "plain")
	setPlain, err := Build(context.Background(), plain)
	if err != nil {
		t.Fatal(err)
	}
	blind := base
	blind.OutDir, blind.Blind, blind.Seed = filepath.Join(dir, "blind"), true, 11
	setBlind, err := Build(context.Background(), blind)
	if err != nil {
		t.Fatal(err)
	}
	keyJSON, err := os.ReadFile(setBlind.KeyFile)
	if err != nil {
		t.Fatal(err)
	}

	// A copy of the page without its clips: the check must see the failure.
	broken := filepath.Join(dir, "broken")
	os.Mkdir(broken, 0o755)
	if page, err := os.ReadFile(filepath.Join(setPlain.Dir, PageFile)); err != nil {
		t.Fatal(err)
	} else if err := os.WriteFile(filepath.Join(broken, PageFile), page, 0o644); err != nil {
		t.Fatal(err)
	}

	b := startBrowser(t)
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	for _, tc := range []struct {
		name  string
		set   *Set
		extra string
		want  []string
	}{
		{"plain", setPlain, "", nil},
		{"blind", setBlind,
			"(function(){ abPage.applyKey(" + string(keyJSON) + "); return JSON.stringify(abPage.data.clips.map(function(c,i){ return abPage.shown(i); })); })()",
			nil},
		{"missing clips", nil, "", nil},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if tc.set == nil {
				rep, _, err := b.openPage(ctx, filepath.Join(broken, PageFile), "")
				if err != nil {
					t.Fatal(err)
				}
				if rep.SelfTest.OK || len(rep.Problems) == 0 {
					t.Errorf("a page whose clips are missing passed: ok %v, problems %q", rep.SelfTest.OK, rep.Problems)
				}
				return
			}
			rep, extra, err := b.openPage(ctx, filepath.Join(tc.set.Dir, PageFile), tc.extra)
			if err != nil {
				t.Fatal(err)
			}
			for _, p := range rep.Problems {
				t.Errorf("browser reported: %s", p)
			}
			folder := (&url.URL{Scheme: "file", Path: tc.set.Dir + "/"}).String()
			if len(rep.Requests) == 0 {
				t.Error("no requests seen: the network log did not work")
			}
			for _, r := range rep.Requests {
				// data: URLs are the browser's own player icons: no network.
				if !strings.HasPrefix(r, folder) && !strings.HasPrefix(r, "data:") {
					t.Errorf("request outside the set's folder (offline page must not make it): %s", r)
				}
			}
			st := rep.SelfTest
			wantPlayers := len(tc.set.Variants) + 1 // clips and the sequence
			if len(st.Clips) != wantPlayers {
				t.Fatalf("%d players, want %d", len(st.Clips), wantPlayers)
			}
			for i, c := range st.Clips {
				want := SequenceFile
				seconds := float64(tc.set.Sequence.Frames) / float64(tc.set.Dry.SampleRate)
				if i < len(tc.set.Variants) {
					want, seconds = tc.set.Variants[i].File, tc.set.Dry.Seconds
				}
				// Duration: the browser reads it from the WAV header; 1 ms
				// covers its rounding of frames to seconds.
				if c.Src != want || c.State != "ready" || c.Error != 0 || abs(c.Duration-seconds) > 1e-3 {
					t.Errorf("player %d: src %q state %s error %d duration %.4f s; want %q ready, %.4f s", i, c.Src, c.State, c.Error, c.Duration, want, seconds)
				}
			}
			if len(st.Switches) != len(tc.set.Variants) {
				t.Errorf("%d switches, want %d", len(st.Switches), len(tc.set.Variants))
			}
			for _, s := range st.Switches {
				// 50 ms: the position is copied, so only the browser's
				// rounding of currentTime separates the two readings.
				if abs(s.After-s.Before) > 0.05 || !s.FromPaused || !s.Playing || s.Later <= s.After || s.Before < 0.2 {
					t.Errorf("switch %d→%d: position %.4f s → %.4f s (later %.4f s), old paused %v, new playing %v",
						s.From, s.To, s.Before, s.After, s.Later, s.FromPaused, s.Playing)
				}
			}
			checkImages(t, tc.set, st.Images)
			if !st.OK {
				t.Errorf("page self-test failed: %+v", st)
			}
			if tc.set.Blind {
				var shown []string
				if err := json.Unmarshal([]byte(extra), &shown); err != nil {
					t.Fatalf("labels after the key: %q: %v", extra, err)
				}
				for i, c := range tc.set.Variants {
					if want := c.BlindLabel + " = " + c.Label; i >= len(shown) || shown[i] != want {
						t.Errorf("clip %d after loading the key shows %q, want %q", i, shown, want)
					}
				}
			}
			files := 0
			for _, r := range rep.Requests {
				if strings.HasPrefix(r, "file:") {
					files++
				}
			}
			t.Logf("%d requests (%d file: URLs in the folder, the rest data: URLs); switches: %+v", len(rep.Requests), files, st.Switches)
		})
	}
}

// checkImages: the page shows the hand-made plot (8 px wide) and the set's
// pictures, each loaded at its file's width, the pictures at least 700 px
// wide on the page (so their 9 pt text stays readable).
func checkImages(t *testing.T, set *Set, imgs []struct {
	Src      string  `json:"src"`
	Complete bool    `json:"complete"`
	Width    int     `json:"width"`
	Shown    float64 `json:"shown"`
}) {
	t.Helper()
	want := map[string]int{}
	for _, c := range set.Variants {
		for _, p := range c.Plots {
			want[p.File] = 8
		}
	}
	for _, p := range set.Pictures {
		f, err := os.Open(filepath.Join(set.Dir, p.File))
		if err != nil {
			t.Fatal(err)
		}
		cfg, err := png.DecodeConfig(f)
		f.Close()
		if err != nil {
			t.Fatalf("%s: %v", p.File, err)
		}
		want[p.File] = cfg.Width
	}
	if len(imgs) != len(want) || len(set.Pictures) != map[bool]int{true: 0, false: 4}[set.Blind] {
		t.Errorf("%d images on the page, %d pictures in the set; want %d images", len(imgs), len(set.Pictures), len(want))
	}
	for _, im := range imgs {
		w, ok := want[im.Src]
		if !ok || !im.Complete || im.Width != w {
			t.Errorf("image %s: loaded %v, %d px wide, want %d", im.Src, im.Complete, im.Width, w)
		}
		if strings.HasPrefix(im.Src, "fig-") && im.Shown < 700 {
			t.Errorf("picture %s shows %.0f px wide on the page, want at least 700", im.Src, im.Shown)
		}
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
