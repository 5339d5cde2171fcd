package calibrate

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"

	"cureslab/cases/internal/num"
	"cureslab/solver"
)

// Synth describes a synthetic trial log: what the thermocouples of a case
// would read, with Gaussian noise, for tests and the example log.
type Synth struct {
	Depths []float64 // m
	Times  []float64 // s, strictly increasing, within the run
	Sigma  float64   // standard deviation of the noise, K; 0 for none
	Seed   uint64
	// Decimals rounds the temperatures to that many decimals of °C, as a
	// logger does; negative writes them exactly (shortest round trip).
	Decimals int
	// Comment lines, written first with "# " before each.
	Comment []string
}

// SyntheticLog runs p and writes the log of s in the shape of probes.csv:
//
//	T_reading = T_simulated(depth, time) + Sigma·z,  z ~ N(0, 1)
//
// with independent z from a PCG generator seeded with s.Seed (the same seed
// gives the same file), each rounded to s.Decimals. It returns an error
// when the run does not reach the last time.
//
// Cost: one solver run.
func SyntheticLog(ctx context.Context, p *solver.Problem, s Synth) ([]byte, error) {
	l := &Log{Times: s.Times}
	for _, z := range s.Depths {
		l.Probes = append(l.Probes, Probe{Depth: z})
	}
	sim, res, err := simulate(ctx, &solver.Workspace{}, p, l)
	if err != nil {
		return nil, err
	}
	if res.Status != solver.OK {
		return nil, fmt.Errorf("the run stopped early: %v", res.Err)
	}
	rng := rand.New(rand.NewPCG(s.Seed, 0x5eed))
	var b bytes.Buffer
	for _, c := range s.Comment {
		b.WriteString(strings.TrimRight("# "+c, " ") + "\n")
	}
	b.WriteString("time_s")
	for _, z := range s.Depths {
		b.WriteString(",T_" + num.FormatDepth(z) + "mm_C")
	}
	b.WriteByte('\n')
	for i, t := range s.Times {
		b.WriteString(strconv.FormatFloat(t, 'f', -1, 64))
		for k := range s.Depths {
			v := sim[k][i]
			if math.IsNaN(v) {
				return nil, fmt.Errorf("no simulated temperature at %g s", t)
			}
			v += s.Sigma*rng.NormFloat64() - 273.15
			b.WriteByte(',')
			if s.Decimals >= 0 {
				b.WriteString(strconv.FormatFloat(v, 'f', s.Decimals, 64))
			} else {
				b.WriteString(strconv.FormatFloat(v, 'g', -1, 64))
			}
		}
		b.WriteByte('\n')
	}
	return b.Bytes(), nil
}
