// Package receipts turns a file of goods receipts into each SKU's lead-time
// law in planning periods, with the counts behind it.
//
// # The file
//
// A table read by inventory/tabular (any delimiter, encoding or workbook
// that reader takes; loose header names and a column map) with the columns
//
//	sku            the item
//	order_date     the day the order was placed
//	receipt_date   the day the goods (or part of them) were received
//	supplier       optional: who delivers; used to pool SKUs with few receipts
//	quantity       optional: units received (a number > 0)
//	order_ref      optional: the order a receipt belongs to (our name), for
//	               orders delivered in several parts
//
// Dates are in one layout per file (tabular.DateLayout, found from the
// dates themselves unless given); a timestamp counts on its date. Rows that
// cannot be used are refused one by one (a *tabular.Error naming the file,
// the line and the column) and the rest of the file is read: an empty sku,
// a date in no layout or outside the years history.MinYear..MaxYear, a
// receipt before its order, a lead time over MaxLeadDays (ten years: a
// typo in a year), a quantity that is not a number > 0, a receipt whose
// order_ref names an order of another order_date or supplier. A file of
// more than MaxRows rows is refused (no more are ever kept in memory).
//
// # Lead time in periods
//
// The planning model (SPEC section 4, and inventory.System) reviews at the
// start of each period; an order placed at the review of period t with
// lead time L arrives in period t+L, before that period's demand. A
// receipt is read against it this way: the order date falls in period t
// and the receipt date in period u of the planning period (day, ISO week
// or calendar month, numbered by history.Period.Of, the history reader's
// arithmetic), and the lead time is L = u - t, the number of period
// boundaries between the two dates. A receipt on the day of its order, or
// later in the same week with weekly planning, has L = 0. The reading is
// slightly optimistic: the model lets a receipt of period u serve all of
// that period's demand, while a receipt late in the period serves only the
// days after it; planning in days removes the difference. This is our
// convention, not a published one.
//
// # Orders delivered in parts
//
// Receipts with the same sku and order_ref are one order (without an
// order_ref column: the same sku, supplier and order_date). The order's
// lead time is that of its LAST receipt, when the order was complete: the
// model delivers each order whole, and counting it complete only when the
// last part came in does not understate the wait. Each order counts once
// in the law, whatever the number of its receipts; the SKU's warnings say
// how many orders came in parts.
//
// # Few receipts, pooling and outliers
//
// A law from fewer than MinOrders orders is marked as resting on few
// receipts (five is a common rule of thumb, not a published threshold).
// Such a SKU is pooled by supplier when its orders name one and the
// suppliers have other orders: its law is that of every order of those
// suppliers, over all their SKUs, with a warning naming the pooling. Without a supplier the SKU keeps the law of
// its own few orders for display, but Law.Usable is false: a batch plan
// keeps the item's lead_time column, with a warning.
//
// In every group of at least MinOrders orders (a SKU's own, or a pool),
// an order whose lead time in days lies beyond Tukey's far-out fences,
// below Q1 - 3s or above Q3 + 3s, is left out of the law and listed with
// its file and line (J. W. Tukey 1977, Exploratory Data Analysis,
// chapter 2, from memory). Q1 and Q3 are the lower and upper hinges (the
// medians of the lower and upper halves) and s is the interquartile
// spread Q3 - Q1 floored at one planning period in days (1, 7 or 30), so
// that a supplier who always takes the same time does not make every
// other lead time an outlier; the floor is our rule. The history reader's
// bulk rule judges gaps between dates, not the size of a duration, so it
// is not reused here.
//
// # Laws the sequential model cannot realise
//
// The model of record for random lead times is Kaplan's sequential
// deliveries (Kaplan 1970, Management Science 16(7); see
// inventory.KaplanCutoff), which can realise only laws whose hazard
// P(L = l)/P(L >= l) does not fall. An observed law often breaks this. Law
// keeps both: Empirical, the observed relative frequencies, and Admissible,
// inventory.NearestKaplan of it (the maximum-likelihood law with a
// non-decreasing hazard), with a warning giving both means when they
// differ. LeadTime picks Admissible under the sequential model and the
// observed law under the independent one, where any law is allowed.
package receipts
