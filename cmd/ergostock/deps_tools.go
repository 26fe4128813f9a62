//go:build tools

// This file pins the project's chosen dependencies in go.mod while the
// packages that use them are being written; it is never built.
package main

import (
	_ "github.com/gocarina/gocsv"
	_ "github.com/schollz/progressbar/v3"
	_ "golang.org/x/term"
	_ "gonum.org/v1/gonum/graph/topo"
	_ "gonum.org/v1/gonum/mat"
	_ "gonum.org/v1/gonum/mathext"
	_ "gonum.org/v1/gonum/optimize"
	_ "gonum.org/v1/gonum/stat/distuv"
	_ "gonum.org/v1/plot"
	_ "gonum.org/v1/plot/vg/vgsvg"
)
