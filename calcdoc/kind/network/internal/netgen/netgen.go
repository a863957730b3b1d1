// Package netgen writes the large generated network that the network
// benchmarks and tests of calcdoc/kind/network and its mna package share.
package netgen

import (
	"fmt"
	"math/rand/v2"
	"strings"
)

// Grid writes a meshed network of about n nodes: a rows×cols grid
// of line sections (Z), a load (Z or Y) on every third node, capacitor
// banks, infeeds with series Z at the corners, current sources, and a
// transformer to a small 400 V part every 100 nodes: the shape of a large
// distribution network of our own invention.
func Grid(n int) string {
	rng := rand.New(rand.NewPCG(500, 18))
	cols := 25
	rows := (n + cols - 1) / cols
	var b strings.Builder
	b.WriteString("ground N\n")
	node := func(r, c int) string { return fmt.Sprintf("b%d_%d", r, c) }
	k := 0
	line := func(format string, a ...any) {
		k++
		fmt.Fprintf(&b, "x%d: ", k)
		fmt.Fprintf(&b, format, a...)
		b.WriteByte('\n')
	}
	for r := 0; r < rows; r++ {
		for c := 0; c < cols; c++ {
			if c+1 < cols {
				line("%s -> %s Z (%.4f + j%.4f) Ω/km * %.3f km", node(r, c), node(r, c+1), 0.1+0.2*rng.Float64(), 0.3+0.1*rng.Float64(), 0.2+2*rng.Float64())
			}
			if r+1 < rows && (c%3 == 0 || rng.Float64() < 0.2) {
				line("%s -> %s Z (%.4f + j%.4f) Ω/km * %.3f km", node(r, c), node(r+1, c), 0.1+0.2*rng.Float64(), 0.3+0.1*rng.Float64(), 0.2+2*rng.Float64())
			}
			switch {
			case (r*cols+c)%3 == 0:
				line("%s -> N Z (%.1f + j%.1f) Ω", node(r, c), 200+800*rng.Float64(), 50+300*rng.Float64())
			case (r*cols+c)%7 == 1:
				line("%s -> N Y j%.4f mS", node(r, c), 0.1+2*rng.Float64())
			case c == cols-1 || r == rows-1:
				line("%s -> N Y (%.4f - j%.4f) mS", node(r, c), 0.1+rng.Float64(), 0.1*rng.Float64())
			}
		}
	}
	for _, rc := range [][2]int{{0, 0}, {rows - 1, cols - 1}, {rows / 2, cols / 2}} {
		line("N -> %s source 6.35 kV∠%.1f°, Z (0.2 + j1.8) Ω", node(rc[0], rc[1]), -3*rng.Float64())
	}
	for i := 0; i < rows; i += 4 {
		line("N -> %s current %.1f A∠%.0f°", node(i, 7), 5+20*rng.Float64(), -60*rng.Float64())
	}
	for t := 0; t*100 < n; t++ {
		s, g := fmt.Sprintf("lv%d", t), fmt.Sprintf("n%d", t)
		fmt.Fprintf(&b, "ground %s\n", g)
		line("%s -> N ratio (6.35 kV / 0.23 kV)∠-30° to %s -> %s", node((t*4)%rows, 12), s, g)
		line("%s -> %s Z (0.6 + j0.2) Ω", s, g)
		line("%s -> %s Y j0.5 S", s, g)
	}
	return strings.TrimRight(b.String(), "\n")
}
