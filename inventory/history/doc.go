// Package history reads demand history from CSV, aggregates it into review
// periods (days, ISO weeks or calendar months) per SKU, summarises each
// series (mean, variance, ADI, CV², demand pattern) and fits candidate
// demand distributions by maximum likelihood, choosing one by AICc (AIC with the small-sample correction).
//
// The package is numerical and never prints: readers return values and
// per-row errors, fits return a Summary with its warnings.
package history
