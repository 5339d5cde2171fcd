package check

import "fmt"

func ExampleAdiabaticRise() {
	// A filled resin: 60 % reacting resin releasing 400 J/g, specific heat
	// 1500 J/kg/K uncured and 1350 J/kg/K cured, starting uncured.
	fmt.Printf("constant c_p: %.1f K\n", AdiabaticRise(0.6*400e3, 1500, 1500, 0))
	fmt.Printf("c_p falling with cure: %.1f K\n", AdiabaticRise(0.6*400e3, 1500, 1350, 0))
	// Output:
	// constant c_p: 160.0 K
	// c_p falling with cure: 168.6 K
}
