// Package history reads demand history from CSV, aggregates it into review
// periods (days, ISO weeks or calendar months) per SKU, summarises each
// series (mean, variance, ADI, CV², demand pattern) and fits candidate
// demand distributions by maximum likelihood, choosing one by AICc (AIC with the small-sample correction).
//
// The package is numerical and never prints: readers return values and
// per-row errors, fits return a Summary with its warnings.
//
// # History that lies
//
// A typo in a date (0001 or 1900 for 2025, 2062 for 2026) must neither
// stretch a series over decades of zeros nor make the reader drop the real
// rows. Read therefore refuses, at the row level, dates outside the years
// MinYear..MaxYear (1900..2200) and then judges each SKU's window by the
// bulk of its rows, in any order of the file:
//
//  1. The SKU's distinct dates (days; the numbers of a period column) are
//     sorted and the gaps between neighbours measured. The usual spacing u
//     is the lower median gap (1 when there is one date).
//  2. A gap is far when it is longer than min(max(G, 20u), A): G = 366
//     days and A = 3653 days (10 years) for dates, G = 52 and A = 520 for
//     a period column. Far gaps cut the rows into spans. The minimum G keeps
//     seasonal items (a few months a year) and slow movers in one span; the
//     cap A always separates records more than ten years apart.
//  3. The span with the most rows (the latest on a tie) is the bulk when
//     it holds at least 90% (BulkShare) of the SKU's rows: the series runs
//     from the bulk's first date, and every row outside it is left out and
//     listed in SKU.LeftOut, with its file, line, date, quantity and how far
//     it lies from the bulk (SKU.Fit turns them into warnings).
//  4. When no span holds 90%, the SKU has no clear bulk: it gets no series
//     and SKU.Err (wrapping ErrNoBulk) names every span, its rows and the
//     line of its first row. Nothing is reshaped silently.
//
// The same rule is then applied once to the rows kept, pooled over all
// SKUs: a SKU whose rows lie far from the bulk of the file's rows (a lone
// SKU dated 2062 in a 2024-2026 file) has them left out in the same way,
// and loses its series if none remain, so that no stray row moves
// History.Last, the end of every series.
//
// Before any series is allocated, each SKU's span (first kept period to
// History.Last) is checked against MaxSpan, and the spans together against
// MaxCells; a SKU beyond the first gets an error wrapping ErrSpan, a file
// beyond the second is refused. Both messages name the file, the line,
// the SKU and the span.
package history
