// Package report gathers what a planner needs to see about one SKU or a
// batch of SKUs, draws it as charts with gonum/plot, and writes one
// self-contained HTML page: inline SVG, inline CSS, no network references,
// readable without JavaScript.
//
// For one SKU (SKU, BuildSKU) the page shows the recommended policy next to
// the current one, the stationary distribution of net inventory (backorder
// mode) or of on-hand stock (lost mode), the total cost over a grid of
// reorder points and order-up-to levels (or order multiples) around the
// optimum, fill rate against the reorder point, the demand history against
// the fitted distribution, and the exact figures against simulated ones.
//
// For a batch (Batch, BuildBatch) it reads the results file of
// `ergostock batch`, and shows a sortable table of items, the exchange curve
// of inventory investment against aggregate fill rate as a common fill-rate
// target varies (Silver, Pyke & Thomas, Inventory and Production Management
// in Supply Chains, 4th ed., 2017), the saving by demand pattern, and the
// warnings and errors.
//
// Colours follow the palette of Okabe & Ito (2008), "Color Universal Design
// (CUD): how to make figures and presentations that are friendly to colorblind
// people"; the heat map uses the viridis colour map (van der Walt & Smith,
// 2015), which stays ordered in lightness for every common form of colour
// blindness and in grey-scale print.
//
// The package does numerical work and drawing only; it never prints. Pages
// are written to an io.Writer given by the caller.
package report
