package main

import (
	"fmt"
	"strings"
)

// GenerateDoc writes a calculation document of about n statements like
// those of the examples (assignments with units, polar values, parallel
// impedances, complex power, checks), in blocks of 50 with prose between
// them. Benchmarks build it.
func GenerateDoc(n int) string {
	var b strings.Builder
	b.WriteString("---\ntitle: Generated feeder schedule\nproject: Benchmark\nnumber: GEN-E-001\nrevision: A\ndate: 2026-11-30\n---\n\n# Feeders\n\n")
	b.WriteString("```calc\nV_n = 230 V\nf = 50 Hz\nZ_src = (0.02 + j0.05) Ω\n")
	count := 3
	for k := 1; count < n; k++ {
		if k%10 == 0 {
			b.WriteString("```\n\nThe next group of feeders.\n\n```calc\n")
		}
		lines := []string{
			fmt.Sprintf("L_%d = %d m                    # route length", k, 20+k%80),
			fmt.Sprintf("Z_%d = (0.727 + j0.08) Ω/km * L_%d   # cable impedance", k, k),
			fmt.Sprintf("Z_t%d = Z_src + Z_%d ∥ (Z_%d * 2)", k, k, k),
			fmt.Sprintf("I_%d = V_n / Z_t%d              # fault current", k, k),
			fmt.Sprintf("S_%d = V_n * conj(16 A∠-30°)    # load", k),
			fmt.Sprintf("check |I_%d| >= 160 A          # disconnection", k),
		}
		for _, l := range lines {
			if count >= n {
				break
			}
			b.WriteString(l + "\n")
			count++
		}
	}
	b.WriteString("```\n")
	return b.String()
}
