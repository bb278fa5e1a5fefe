package catalog_test

import (
	"fmt"

	"github.com/skyframe/skyframe/catalog"
)

func ExampleOpen() {
	stars, rep, err := catalog.Open("../testdata/catalogs/bsc5_good.dat", catalog.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(rep.Format, rep.Rows, "stars")
	for _, s := range rep.Skips {
		fmt.Printf("skipped %d (%s), first at line %d\n", s.Count, s.Reason, s.FirstLine)
	}
	i, _ := stars.Find("HR 9201")
	st := stars.At(i)
	fmt.Printf("%s: V = %.2f, %.0f pc, %.0f K\n", st.Name, st.Vmag, st.Dist, st.Teff)
	// Output:
	// bsc5 3 stars
	// skipped 1 (no position), first at line 3
	// skipped 1 (no V magnitude), first at line 4
	// 7Kap Tst: V = 4.56, 20 pc, 5778 K
}

func ExampleRead_error() {
	_, _, err := catalog.Open("../testdata/catalogs/bsc5_bad.dat", catalog.ReadOptions{})
	fmt.Println(err)
	// Output:
	// catalog: ../testdata/catalogs/bsc5_bad.dat:2: field Vmag: value "4.x6": not a number
}
