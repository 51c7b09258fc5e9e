package measure

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/models"
)

// A linear circuit maps a sine to a sine of the same frequency (a
// textbook fact of linear time-invariant systems): every bin off the
// harmonic lines holds only the measurement's residue, so the ratio must
// lie above the analysis floor (100 dB, AnalysisFloor) at every factor,
// 1× (no resampler) included. The RC low-pass at 1 kHz also shows the
// tone moving: 1 kHz is 1/48 of 48 kHz.
func TestAliasOfALinearChain(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	rep, err := Run(context.Background(), ch, Plan{Freq: 1000, Amplitude: 0.5, Options: Options{Alias: true, AliasFactors: []int{1, 4}}})
	if err != nil {
		t.Fatal(err)
	}
	a := rep.Measurements[0].Alias
	if a == nil || len(a.Factors) != 2 {
		t.Fatalf("alias figures: %+v", a)
	}
	if a.Moved == "" || a.FrequencyHz != 1010 {
		t.Errorf("1 kHz at 48 kHz: tone %g Hz, moved %q; want 1010 Hz (101 cycles in 0.1 s) and a reason", a.FrequencyHz, a.Moved)
	}
	for _, f := range a.Factors {
		t.Logf("%d×: %.1f dB", f.Oversample, float64(f.SignalToAliasDB))
		if !(float64(f.SignalToAliasDB) > a.FloorDB) || !f.MeetsTarget || !f.Settled {
			t.Errorf("%d×: %.1f dB, floor %.0f dB, meets %v, settled %v", f.Oversample, float64(f.SignalToAliasDB), a.FloorDB, f.MeetsTarget, f.Settled)
		}
	}
}

// The aliasing of a clipping circuit falls as the internal rate rises:
// the demo chain at full fuzz, 1319 Hz at 0.3 of full scale (120 mV at
// the source, its input peak being 400 mV), from 2× to 8× at least 10 dB
// (common practice for a hard-clipping stage: each doubling moves the
// folding point an octave up a harmonic spectrum falling 6–12 dB per
// octave, 12–24 dB over two). 1319 Hz is kept: prime, so its 1 s record
// shows every folded line. The factors come sorted whatever the order
// asked.
func TestAliasFallsWithTheFactor(t *testing.T) {
	if testing.Short() {
		t.Skip("renders about 12 s of audio")
	}
	ch, err := chains.Load("../chains/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Run(context.Background(), ch, Plan{Variants: []Variant{{Sets: []string{"fuzz.fuzz=1"}}}, Freq: 1319, Amplitude: 0.12,
		Options: Options{Alias: true, AliasFactors: []int{8, 2}}})
	if err != nil {
		t.Fatal(err)
	}
	a := rep.Measurements[0].Alias
	if a.Moved != "" || a.FrequencyHz != 1319 || len(a.Factors) != 2 || a.Factors[0].Oversample != 2 {
		t.Fatalf("alias figures: %+v", a)
	}
	lo, hi := float64(a.Factors[0].SignalToAliasDB), float64(a.Factors[1].SignalToAliasDB)
	t.Logf("2×: %.1f dB, 8×: %.1f dB", lo, hi)
	if !(hi >= lo+10) {
		t.Errorf("signal-to-alias %.1f dB at 8× is not 10 dB above %.1f dB at 2×", hi, lo)
	}
	if !a.Factors[0].Settled || !a.Factors[1].Settled {
		t.Errorf("not settled: %+v", a.Factors)
	}
}

// The factor list: a comma list of whole numbers 1…16, sorted, repeats
// dropped; anything else is an error on the field "alias_factors".
func TestParseFactors(t *testing.T) {
	for _, tc := range []struct {
		text string
		want []int
	}{{"2,4,8,16", []int{2, 4, 8, 16}}, {"8, 2,2", []int{2, 8}}, {"1", []int{1}}} {
		got, err := ParseFactors(tc.text)
		if err != nil || len(got) != len(tc.want) {
			t.Errorf("%q: %v, %v", tc.text, got, err)
			continue
		}
		for i := range got {
			if got[i] != tc.want[i] {
				t.Errorf("%q: %v, want %v", tc.text, got, tc.want)
			}
		}
	}
	for _, bad := range []string{"", "0", "17", "4,x", "2.5", "4,,8", "-2"} {
		_, err := ParseFactors(bad)
		var fe *models.FieldError
		if !errors.As(err, &fe) || fe.Field != "alias_factors" {
			t.Errorf("%q: %v", bad, err)
		}
	}
	if _, err := Run(context.Background(), loadChain(t, "rc-lowpass"), Plan{Freq: 1000, Amplitude: 0.1, Options: Options{Alias: true, AliasFactors: []int{0}}}); err == nil {
		t.Error("factor 0 accepted")
	}
}

// The JSON of a measurement with alias figures: "alias" with the tone,
// the target and one entry per factor; the table shows them.
func TestAliasReport(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	rep, err := Run(context.Background(), ch, Plan{Freq: 1319, Amplitude: 0.5, Options: Options{Alias: true}})
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(rep.Measurements[0])
	if err != nil {
		t.Fatal(err)
	}
	var got struct {
		Alias struct {
			FrequencyHz float64 `json:"frequency_hz"`
			TargetDB    float64 `json:"target_db"`
			Factors     []struct {
				Oversample int      `json:"oversample"`
				DB         *float64 `json:"signal_to_alias_db"`
			} `json:"factors"`
		} `json:"alias"`
	}
	if err := json.Unmarshal(b, &got); err != nil {
		t.Fatal(err)
	}
	if got.Alias.FrequencyHz != 1319 || got.Alias.TargetDB != 50 || len(got.Alias.Factors) != 1 || got.Alias.Factors[0].Oversample != 4 {
		t.Errorf("JSON: %s", b)
	}
	var sb strings.Builder
	if err := rep.WriteTable(&sb); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(sb.String(), "aliasing") || !strings.Contains(sb.String(), "> 100") {
		t.Errorf("table:\n%s", sb.String())
	}
	if math.IsNaN(rep.Measurements[0].Alias.FloorDB) {
		t.Error("no floor")
	}
}
