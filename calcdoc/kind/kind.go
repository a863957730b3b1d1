// Package kind is the registry of the block kinds calcdoc ships: calc,
// solve, phasors, sweep, network and table, each one unit in its own folder that
// evaluates its blocks and draws them.
package kind

import (
	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/calc"
	"calcdoc/calcdoc/kind/network"
	"calcdoc/calcdoc/kind/phasors"
	"calcdoc/calcdoc/kind/solve"
	"calcdoc/calcdoc/kind/sweep"
	"calcdoc/calcdoc/kind/table"
)

var standard = calcdoc.NewRegistry(calc.Kind, solve.Kind, phasors.Kind, sweep.Kind, network.Kind, table.Kind)

// Standard returns the registry of the shipped block kinds.
func Standard() *calcdoc.Registry { return standard }
