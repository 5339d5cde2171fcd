package tune_test

import (
	"fmt"

	"cureslab/cases/tune"
)

func ExampleParseFree() {
	f, err := tune.ParseFree("schedules.oven.segments.1.hold=30min:3h")
	if err != nil {
		panic(err)
	}
	fmt.Printf("%s from %v to %v\n", f.Key, f.From, f.To)
	_, err = tune.ParseFree("schedules.oven.segments.1.hold=30min")
	fmt.Println(err)
	// Output:
	// schedules.oven.segments.1.hold from 30 min to 3 h
	// --free schedules.oven.segments.1.hold=30min: want the range LO:HI after '=', such as 30min:180min
}
