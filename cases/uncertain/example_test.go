package uncertain_test

import (
	"fmt"

	"cureslab/cases/uncertain"
)

func ExampleQuantile() {
	x := []float64{1, 2, 3, 4} // sorted
	fmt.Printf("%.4g %.4g %.4g\n", uncertain.Quantile(0.05, x), uncertain.Quantile(0.5, x), uncertain.Quantile(0.95, x))
	// Output: 1.15 2.5 3.85
}
