// Package whatif is the server behind `ergostock serve`: a local page on
// which a planner reviews the items of a batch run, tries levels by hand
// with exact figures from the engine, asks for the cheapest levels under
// the inputs on screen, and records a decision per item.
//
// The package owns the HTTP side only. The evaluations come from an
// Engine that the command supplies: it runs the `evaluate` and `optimize`
// commands themselves, so an answer of POST /api/evaluate is byte for byte
// what `ergostock evaluate --json` prints for the same inputs, and a
// refusal carries the same one-line message. Files are read by the command
// and passed in (Catalogue); the decisions file is written here, through
// batch.CreateAtomic, as a log in the format of batch.ReadDecisions.
//
// Endpoints (every answer is JSON; every error {"error": "one line"}):
//
//	GET  /api/items            the catalogue: one summary per item
//	GET  /api/items/{sku}      one item: inputs, levels, history, fit
//	POST /api/evaluate         evaluate's JSON for the request's inputs
//	POST /api/optimize         optimize's JSON for the request's inputs
//	GET  /api/levels?...       stationary stock-level law for the inputs,
//	                           with evaluate's answer beside it
//	GET  /api/decisions        the latest decision of every SKU
//	POST /api/decisions        record a decision (409 when stale)
//
// A request object names the flags of evaluate or optimize with "-"
// written as "_" (holding_cost, order_up_to, min_fill_rate, ...); values
// are JSON numbers or strings, null meaning "not given". Unknown names
// are refused. Request bodies are limited in size, each evaluation in
// time, and a panic fails only its request.
package whatif
