package cases_test

import (
	"fmt"

	"cureslab/cases"
)

func ExampleQuantile() {
	x := []float64{1, 2, 3, 4} // sorted
	fmt.Printf("%.4g %.4g %.4g\n", cases.Quantile(0.05, x), cases.Quantile(0.5, x), cases.Quantile(0.95, x))
	// Output: 1.15 2.5 3.85
}

func ExampleParseFree() {
	f, err := cases.ParseFree("schedules.oven.segments.1.hold=30min:3h")
	if err != nil {
		panic(err)
	}
	fmt.Printf("%s from %v to %v\n", f.Key, f.From, f.To)
	_, err = cases.ParseFree("schedules.oven.segments.1.hold=30min")
	fmt.Println(err)
	// Output:
	// schedules.oven.segments.1.hold from 30 min to 3 h
	// --free schedules.oven.segments.1.hold=30min: want the range LO:HI after '=', such as 30min:180min
}
