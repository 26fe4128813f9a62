package batch

// The sheets of a results workbook (see WorkbookWriter).
const (
	ResultsSheet  = "results"  // one row per item, the columns of the CSV
	WarningsSheet = "warnings" // one row per warning: sku, item, warning
	RunSheet      = "run"      // the header record and its fields, one per row
)
