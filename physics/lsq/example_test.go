package lsq_test

import (
	"context"
	"fmt"
	"math"

	"cureslab/physics/lsq"
)

// A first-order decay y = y0·e^(−k·t) fitted to six readings: k is a rate
// constant, fitted on a logarithmic scale within bounds; y0 is linear and
// free.
func ExampleFit() {
	t := []float64{0, 1, 2, 3, 4, 5}
	y := []float64{10.1, 6.0, 3.7, 2.2, 1.4, 0.8}
	res := func(dst, v []float64) {
		for i := range t {
			dst[i] = v[0]*math.Exp(-v[1]*t[i]) - y[i]
		}
	}
	est, err := lsq.Fit(context.Background(), lsq.Problem{
		Vars: []lsq.Var{
			{Start: 5, Lo: math.Inf(-1), Hi: math.Inf(1)},
			{Start: 1, Lo: 0.01, Hi: 100, Log: true},
		},
		M:         len(t),
		Residuals: res,
	}, lsq.Settings{})
	if err != nil {
		panic(err)
	}
	fmt.Println(est.Status)
	for i, name := range []string{"y0", "k"} {
		fmt.Printf("%s = %.4f ± %.4f, 95 %% interval [%.4f, %.4f]\n", name, est.Value[i], est.SE[i], est.Low[i], est.High[i])
	}
	fmt.Printf("correlation %.3f, s = %.3f on %d degrees of freedom\n", est.Corr.At(0, 1), est.Sigma, est.DoF)
	// Output:
	// converged
	// y0 = 10.0703 ± 0.0520, 95 % interval [9.9261, 10.2146]
	// k = 0.5050 ± 0.0049, 95 % interval [0.4917, 0.5187]
	// correlation 0.526, s = 0.055 on 4 degrees of freedom
}
