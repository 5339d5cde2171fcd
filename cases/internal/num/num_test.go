package num

import "fmt"

func ExampleFormatDepth() {
	for _, d := range []float64{0, 6.35e-3, 17.4625e-3, 9.3e-3} {
		fmt.Printf("T_%smm_C\n", FormatDepth(d))
	}
	// Output:
	// T_0mm_C
	// T_6.35mm_C
	// T_17.4625mm_C
	// T_9.3mm_C
}
