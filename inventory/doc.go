// Package inventory holds the single-item inventory system: demand
// distributions on the non-negative integers and their text grammar,
// lead-time demand, partial expectations, the system's costs and mode, and
// the Figures record every evaluation reports.
package inventory
