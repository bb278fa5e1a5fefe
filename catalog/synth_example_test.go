package catalog_test

import (
	"fmt"

	"github.com/skyframe/skyframe/catalog"
)

// The built-in sky holds the invented nearby stars under their names, so a
// flight plan can name one as its destination.
func ExampleNearbyStars() {
	sky := catalog.BuiltIn()
	for _, st := range catalog.NearbyStars() {
		row, _ := sky.Find(st.Name)
		sp, _ := catalog.NearbySpectralType(st.Name)
		fmt.Printf("%-13s %-6s %.2f pc  V = %5.2f  row %d\n", st.Name, sp, st.Dist, st.Vmag, row)
	}
	// Output:
	// Ambrel        M1.5 V 2.74 pc  V =  7.09  row 0
	// Ketterin      M4.5 V 1.93 pc  V =  9.63  row 1
	// Marrowby      K1 V   3.31 pc  V =  3.70  row 2
	// Sollow        G2 V   4.22 pc  V =  2.93  row 3
	// Thistlemere   M3 V   4.06 pc  V =  9.14  row 4
	// Oskelund      M5.5 V 3.68 pc  V = 12.33  row 5
	// Pennick Ember DA7    4.71 pc  V = 11.37  row 6
}

// A fainter synthetic sky with its own seed; every star has a distance and a
// temperature.
func ExampleSynthetic() {
	sky := catalog.Synthetic(catalog.SynthOptions{Seed: 42, MagLimit: 5, NoNearby: true})
	bright := 0
	for i := 0; i < sky.Len(); i++ {
		if sky.Vmag[i] <= 5 && sky.Dist[i] >= 5 && sky.Teff[i] > 0 {
			bright++
		}
	}
	fmt.Println(sky.Source, sky.Format, sky.Epoch, bright == sky.Len(), bright > 1000 && bright < 2300)
	// Output:
	// built-in sky synthetic 2000 true true
}
