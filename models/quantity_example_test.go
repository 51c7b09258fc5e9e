package models_test

import (
	"fmt"

	"renderchain/models"
)

// A supply given on a command line keeps the chain file's polarity: on a
// positive-ground build (supply = "-9V") a list of magnitudes is a list of
// negative supplies, and a contradicting sign says how to write it.
func ExampleParseSupplies() {
	v, err := models.ParseSupplies("9.6,9,8,7", -9)
	fmt.Println(v, err)
	_, err = models.ParseSupply("+7V", -9)
	fmt.Println(err)
	// Output:
	// [-9.6 -9 -8 -7] <nil>
	// supply "+7V": the chain file is built for a negative supply (positive ground); write 7V or -7V (a supply given outside the chain file sets the magnitude and keeps the file's polarity; change supply in the file to change the build)
}

func ExampleParseAmplitude() {
	for _, s := range []string{"100mV", "20mVpp", "-20dBV", "nan"} {
		v, err := models.ParseAmplitude(s)
		fmt.Printf("%-7s %.6f V peak %v\n", s, v, err)
	}
	// Output:
	// 100mV   0.100000 V peak <nil>
	// 20mVpp  0.010000 V peak <nil>
	// -20dBV  0.141421 V peak <nil>
	// nan     0.000000 V peak value "nan" is not an amplitude (no number)
}
