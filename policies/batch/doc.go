// Package batch plans a whole catalogue: it reads the items file (one SKU a
// row with its costs, lead time and the policy in use), runs the per-item
// plan (demand model -> system -> cheapest policy -> the current policy's
// cost -> one result row) over many workers, and writes the results CSV in
// input order, independent of the number of workers.
//
// # Items file
//
// A CSV file with a header naming the columns, in any order and any letter
// case; unknown columns are ignored. Required: sku, lead_time,
// holding_cost, shortage_cost. Optional: order_cost and unit_cost (default
// 0), unmet (backorder or lost; default backorder), policy (base-stock, s-S
// or s-nQ; default s-S when order_cost > 0, else base-stock),
// min_fill_rate (a floor for the search, in [0, 1); default none), demand
// (a distribution in the text grammar of package inventory that replaces
// the fit of the item's history), and the policy in use,
// current_reorder_point, current_order_up_to and current_order_multiple,
// read like the policy flags of the command line:
//
//	current_order_up_to alone                      base-stock with that level
//	current_reorder_point and current_order_up_to  s-S
//	current_reorder_point and current_order_multiple s-nQ
//	all three empty                                no current policy
//
// Any other combination is an error of that item. The text grammar of a
// demand separates parameters by commas, so a demand cell with more than
// one parameter must be quoted, as CSV quotes any cell holding a comma:
// "negbin:mean=3,var=7".
//
// A missing required column, a column named twice or a CSV syntax error
// fails the whole file. A cell that cannot be used fails only its item, with
// an error naming the file, the line, the column and what was wanted:
//
//	items.csv:12: holding_cost "-3": want a finite cost >= 0
//
// A SKU that appears again fails on its later rows, naming the line of the
// first. An item whose history has any bad row, or no row, fails too (see
// HistoryFit).
//
// # Positions and shards
//
// Items are numbered 0, 1, 2, ... by their position among the data rows of
// the items file (blank lines are not rows). A Shard K/N keeps the items
// whose position is K modulo N, so that N independent runs partition the
// catalogue; every run still reads the whole items file, so duplicate SKUs
// are judged the same way in each.
//
// # Results file
//
// The first line is the header record (see Meta): a comment line starting
// "# ergostock results v2; " with the planning period, digests of the items
// and history files and the run digest. Then the CSV header and one row per
// item, in the order of the items file, under the header given
// by Header: sku, demand (the model as a text-grammar string), demand_mean,
// demand_variance (the moments of that model), pattern (of the history, by
// the cut-offs of Syntetos, Boylan and Croston, 2005), policy,
// reorder_point, order_up_to, order_multiple (empty where the policy type
// has no such level), every figure of inventory.Figures in the order of
// Figures.Fields, current_total_cost, saving (current_total_cost minus
// total_cost, empty without a current policy), warnings (joined with "; "),
// error, and then states, residual and balance (the diagnostics of the
// stationary solve of the chosen policy's chain), neglected (the probability mass left out by any
// truncation), policies_evaluated (by the search) and item (the 0-based
// position in the items file, to restore input order after merging shards).
//
// A row with an error has empty policy levels, figures and costs; its
// demand columns, pattern and warnings are kept where they were known
// before the failure. Numbers are printed by strconv.FormatFloat with
// format 'g' and the shortest precision that reads back to the same
// float64, so the file loses nothing. Text cells pass through Guard: line
// breaks are folded, and a cell starting with =, +, -, @ or a tab (or a
// single quote) gets a leading single quote so that a spreadsheet does not
// run it as a formula; Unguard drops it when reading.
//
// After item come the policy in use and its fill rate (current_policy,
// current_reorder_point, current_order_up_to, current_order_multiple,
// current_fill_rate), then any item columns carried by Carry. A Format
// (NewFormatWriter) writes the same cells in a spreadsheet dialect: ';' or
// tab delimited, decimal commas, figures rounded to N significant digits;
// WorkbookWriter writes them as an .xlsx workbook. Merge joins the parts
// of a sharded run into the file the unsharded run writes.
//
// # Running a catalogue
//
// Planner.PlanAll plans the items over Run: each item in its own goroutine
// with a budget (RunOptions.ItemTimeout, passed to the engine through
// policies.Options.Context); a panic, a timeout, an error or a figure that
// is not finite fails only that item. CreateAtomic opens the results file
// under a lock and a temporary name, so that a failed or interrupted run
// leaves nothing and an existing file as it was.
package batch
