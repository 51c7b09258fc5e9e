package spectrum

import (
	"math"
	"testing"
)

// Nominal one-third-octave midband frequencies 25 Hz – 20 kHz as tabulated
// in IEC 61260-1:2014, Annex E, Table E.1 (table location cited from
// memory); the same values are the ISO 266:1997 preferred frequencies.
var iec61260Nominal = []float64{
	25, 31.5, 40, 50, 63, 80, 100, 125, 160, 200,
	250, 315, 400, 500, 630, 800, 1000, 1250, 1600, 2000,
	2500, 3150, 4000, 5000, 6300, 8000, 10000, 12500, 16000, 20000,
}

func TestThirdOctaveNominalTable(t *testing.T) {
	got := ThirdOctaveCentres()
	if len(got) != len(iec61260Nominal) || len(got) != LastBand-FirstBand+1 {
		t.Fatalf("%d centres, want %d", len(got), len(iec61260Nominal))
	}
	// Renard R10 preferred-number mantissas (ISO 3:1973, series R10;
	// from memory): every nominal value is one of them times a power of 10.
	r10 := []float64{1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8}
	for i, f := range got {
		if f != iec61260Nominal[i] {
			t.Errorf("band %d: nominal %g Hz, IEC 61260-1 lists %g Hz", FirstBand+i, f, iec61260Nominal[i])
		}
		x := FirstBand + i
		decade := math.Floor(float64(x) / 10)
		want := r10[x-10*int(decade)] * 1000 * math.Pow(10, decade)
		if math.Abs(f-want) > 1e-9*want {
			t.Errorf("band %d: nominal %g Hz is not the R10 value %g Hz", x, f, want)
		}
		// Nominal labels round the exact base-10 midband frequency; the
		// largest rounding in this range is 160 vs 158.49 Hz (0.95 %),
		// computed from the formula: tolerance 1 %.
		if d := math.Abs(f/MidbandFrequency(x) - 1); d > 0.01 {
			t.Errorf("band %d: nominal %g Hz is %.2g off exact %g Hz", x, f, d, MidbandFrequency(x))
		}
	}
	got[0] = -1 // the returned slice is a copy
	if ThirdOctaveCentres()[0] != 25 {
		t.Error("ThirdOctaveCentres exposes its table")
	}
}

// Exact midband and edge frequencies of IEC 61260-1 (base-10 system,
// G = 10^(3/10), fm = 1000·G^(x/3), edges fm·G^(∓1/6)).
func TestThirdOctaveExactFrequencies(t *testing.T) {
	cases := []struct {
		x                int
		fm, lower, upper float64 // Hz, to the digits given (from memory, widely tabulated)
		tol              float64 // relative: half a unit of the last digit given
	}{
		{0, 1000, 891.25, 1122.02, 6e-6},
		{-16, 25.119, 22.387, 28.184, 3e-5},
		{-10, 100, 89.125, 112.20, 6e-5},
		{10, 10000, 8912.5, 11220, 6e-5},
		{13, 19953, 17783, 22387, 3e-5},
	}
	for _, c := range cases {
		fm := MidbandFrequency(c.x)
		lo, hi := BandEdges(c.x)
		if relErr(fm, c.fm) > c.tol || relErr(lo, c.lower) > c.tol || relErr(hi, c.upper) > c.tol {
			t.Errorf("band %d: fm %.6g [%.6g, %.6g], want %.6g [%.6g, %.6g]", c.x, fm, lo, hi, c.fm, c.lower, c.upper)
		}
	}
	g := math.Pow(10, 0.3)
	for x := FirstBand; x <= LastBand; x++ {
		fm := MidbandFrequency(x)
		lo, hi := BandEdges(x)
		// fm is the geometric mean of the edges, which are G^(1/3) apart
		// (definition; rounding only: 1e-12).
		if relErr(math.Sqrt(lo*hi), fm) > 1e-12 || relErr(hi/lo, math.Cbrt(g)) > 1e-12 {
			t.Errorf("band %d: edges %g, %g around %g", x, lo, hi, fm)
		}
		// Successive midbands are G^(1/3) = 10^(1/10) apart.
		if relErr(MidbandFrequency(x+1)/fm, math.Pow(10, 0.1)) > 1e-12 {
			t.Errorf("band %d: ratio to next %g", x, MidbandFrequency(x+1)/fm)
		}
		// Bands tile the axis: upper edge of x is lower edge of x+1.
		if lo2, _ := BandEdges(x + 1); lo2 != hi {
			t.Errorf("band %d: upper %v ≠ next lower %v", x, hi, lo2)
		}
	}
}
