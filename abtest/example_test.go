package abtest_test

import (
	"fmt"

	"renderchain/abtest"
)

func ExampleParseVariant() {
	v, err := abtest.ParseVariant("hotter Q2: fuzz.Q2.hfe=250 supply=9.6V")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%q %q\n", v.Label, v.Settings)
	_, err = abtest.ParseVariant("hotter Q2 fuzz.Q2.hfe=250")
	fmt.Println(err)
	// Output:
	// "hotter Q2" ["fuzz.Q2.hfe=250" "supply=9.6V"]
	// variant "hotter Q2 fuzz.Q2.hfe=250": want "LABEL: KEY=VALUE …" (a colon after the label)
}

func ExampleMatch() {
	// A dense fuzz clip (loud, small peak-to-loudness ratio) and a dry
	// take (quiet, peaky): the dry take cannot reach −14 LUFS under a
	// −1 dBTP ceiling, so both meet lower.
	clips := []abtest.Measured{
		{LUFS: -9.5, TruePeakDBTP: -0.5}, // 9 dB ratio
		{LUFS: -26, TruePeakDBTP: -9},    // 17 dB ratio
	}
	common, gains, limited := abtest.Match(clips, -14, -1)
	fmt.Printf("common %.3f LUFS, ceiling decided: %v\n", common, limited)
	for i, g := range gains {
		fmt.Printf("clip %d: gain %+.3f dB, true peak %.3f dBTP\n", i, g, clips[i].TruePeakDBTP+g)
	}
	// Output:
	// common -18.001 LUFS, ceiling decided: true
	// clip 0: gain -8.501 dB, true peak -9.001 dBTP
	// clip 1: gain +7.999 dB, true peak -1.001 dBTP
}

func ExampleNeutralLabel() {
	for _, i := range []int{0, 1, 25, 26} {
		fmt.Print(abtest.NeutralLabel(i), " ")
	}
	fmt.Println()
	// Output: A B Z AA
}
