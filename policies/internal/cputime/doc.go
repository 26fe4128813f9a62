// Package cputime reports the CPU time of the process per benchmark
// operation (cpu-ms/op), a figure that varies less than wall time on a
// machine shared with other work. It is for the benchmarks of the policies
// packages only.
package cputime
