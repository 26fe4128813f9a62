// Package uncertainty says how far a recommended policy may be off when its
// demand model was fitted from a short history, what that may cost, and
// which policy holds up under the uncertainty.
//
// The fitted model is an estimate. Resampling the history and refitting
// gives B plausible models (the bootstrap of B. Efron and R. J. Tibshirani,
// An Introduction to the Bootstrap, Chapman & Hall, 1993); on each one the
// package finds that model's own optimum and evaluates the recommended
// policy held fixed, both exactly with policies.Optimize and
// policies.Evaluate. From these come
//
//   - bands: the 5th, 50th and 95th percentiles of the optimal reorder
//     point, order-up-to level and order multiple over the resampled
//     models;
//   - the figures to expect: the distribution (mean and percentiles) of
//     the recommended policy's fill rate, stockout probability and total
//     cost under the resampled models;
//   - regret: the extra cost of the recommended policy over each resampled
//     model's own optimum, its mean and its 95th percentile;
//   - optionally a robust policy (Robust): the one of least mean cost over
//     the resampled models that meets a fill-rate floor in at least a
//     given share of them, each candidate evaluated exactly on every
//     model, in the spirit of operational statistics (L. H. Liyanage and
//     J. G. Shanthikumar, "A practical inventory control policy using
//     operational statistics", Operations Research Letters 33, 341-348,
//     2005) and of inventory targets set from limited data (Y. Akcay,
//     B. Biller and S. Tayur, "Improved inventory targets in the presence
//     of limited historical demand data", Management Science 57(12),
//     2154-2169, 2011).
//
// Three resampling schemes (Scheme):
//
//   - iid, the default: n periods drawn with replacement from the n
//     observed ones (Efron and Tibshirani 1993, ch. 6). Right when periods
//     are independent, which is the model's own assumption.
//   - block: the moving-block bootstrap (H. R. Kunsch, "The jackknife and
//     the bootstrap for general stationary observations", Annals of
//     Statistics 17(3), 1217-1241, 1989): blocks of l consecutive periods,
//     l chosen by the automatic rule of D. N. Politis and H. White,
//     "Automatic block-length selection for the dependent bootstrap",
//     Econometric Reviews 23(1), 53-70, 2004 (with the correction of
//     A. Patton, D. N. Politis and H. White, Econometric Reviews 28(4),
//     2009). It keeps runs of high and low demand together.
//   - auto: block where the lag-1 autocorrelation of the history is
//     significant at 5% (|r1| > 1.96/sqrt(n), Bartlett's large-sample
//     standard error under independence; M. S. Bartlett, 1946), else iid.
//   - parametric: n periods drawn from the fitted model itself, then
//     refitted (Efron and Tibshirani 1993, sec. 6.5).
//
// Every resample is refitted by the same rule as the command fit
// (history.Fit: maximum likelihood per candidate, choice by AICc), so the
// bands carry the uncertainty of the model choice as well as that of its
// parameters.
//
// Determinism: resample b of SKU k under seed s draws from its own PCG
// stream (M. E. O'Neill, 2014) seeded from (s, k, b) through SplitMix64,
// so the results are the same for any worker count and any order of
// SKUs.
//
// Cautions: the bootstrap cannot see what the history does not hold (a
// season, a trend, a new customer); with very few non-zero periods the
// bands are themselves rough. For critical items (medicines, safety
// spares) the bands are an aid to judgement, not a replacement for local
// practice and regulation.
package uncertainty
