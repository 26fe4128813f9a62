// Package network plans one item over a two-level supply network: a
// central store (the centre) that orders from an outside supplier and
// replenishes one or more local stores, which face the external demand.
// Every location follows a base-stock rule, reviewed every period, and
// unmet demand is backordered at every level.
//
// # Events of a period
//
// Each location keeps the single-location order of events (review,
// receive, serve demand, charges); within a period the two levels
// interleave as follows, so that an order placed at the review of period t
// arrives in period t + L before that period's demand:
//
//  1. Review. Each store orders from the centre what raises its inventory
//     position (on hand + in transit + owed by the centre - backorders) to
//     its level (orders of the same review queue at the centre in an order
//     that rotates from period to period). The centre then orders from the supplier what raises its
//     own position to its level.
//  2. Receive. The centre receives the order it placed L0 periods ago
//     (L0 = 0: the order just placed), then ships to the stores what it
//     owes them, oldest store order first (first come, first served), as
//     far as its stock allows. Each store receives the shipment sent Li
//     periods ago (Li = 0: the one just sent).
//  3. Demand at the stores is served from stock on hand; what cannot be
//     served is backordered.
//  4. Charges at the end of the period: each location's holding cost per
//     unit it has on hand (stock in transit between the centre and a store
//     is not charged: its mean, L_i times the store's mean demand, does not
//     depend on the levels), and each store's shortage cost per unit
//     backordered.
//
// # Levels
//
// A store's base-stock level is on its own inventory position. The
// centre's level is read either as an echelon level (Echelon: the position
// of the centre and everything below it, centre stock + stock in transit
// to the stores + the stores' net stock + everything on order from the
// supplier) or as an installation level (Installation: the centre's own
// position, on hand + on order - owed to the stores). Because the stores
// order before the centre reviews, the two readings describe the same
// policy, with installation level = echelon level - the sum of the store
// levels (Axsater, Inventory Control, 3rd ed., 2015, section 8.3, from
// memory).
//
// # One store: exact
//
// With one store (a serial system) and X_n the store's demand over n
// periods, the order the centre placed at the review of period t has
// arrived by period t + L0, so the echelon stock there (before shipping)
// is S0 - X_{L0}, S0 the centre's echelon level; after shipping, the
// store's position less what is still owed to it is
//
//	Y = min(S1, S0 - X_{L0})
//
// and the store's net stock at the end of period t + L0 + L1 is
// Y - X'_{L1+1}, with X' the demand of the L1 + 1 periods that follow,
// independent of X_{L0} (Clark & Scarf, "Optimal policies for a
// multi-echelon inventory problem", Management Science 6(4), 1960; Chen &
// Zheng, "Lower bounds for multi-echelon stochastic inventory systems",
// Management Science 40(11), 1994). Every figure is an expectation over
// these two independent laws, computed exactly (tails of the centre's
// lead-time demand are cut where they are below 1e-15, and the cut mass is
// reported). With L0 = 0 the store is the single-location base-stock
// system with level min(S1, S0).
//
// The cheapest echelon levels come from the exact recursion: the store's
// level S1* minimises its echelon cost, the critical fractile
// P(X_{L1+1} <= S1*) >= (b + h0)/(b + h1), and the centre's level
// minimises h0 (S0 - E X_{L0}) + E[G1(min(S1*, S0 - X_{L0}))], with G1 the
// store's cost less h0 times its position (the induced penalty of Clark
// and Scarf). When h1 <= h0 the centre holds nothing (S1 = S0).
//
// # Several stores: an approximation
//
// With N stores the centre's own figures stay exact (its net stock is its
// installation level less the total demand over L0 periods), and so is the
// identity for store i: its net stock is s_i - B_i - X_{i,Li+1}, where B_i
// is the part of the centre's backorders owed to store i. Only the law of
// B_i is approximated: given the centre's backorders B, it is binomial with
// the store's share of mean demand (the METRIC decomposition of
// Sherbrooke, "METRIC: a multi-echelon technique for recoverable item
// control", Operations Research 16(1), 1968, with the disaggregation of
// Graves, "A multi-echelon inventory model for a repairable item with
// one-for-one replenishment", Management Science 31(10), 1985). The law
// of B_i is used in full rather than through Graves' two-moment fit. The
// result is labelled approximate (Result.Exact false); Simulate measures
// its error.
//
// # Simulation
//
// Simulate plays the periods one by one with the events above, a first
// come, first served queue of store orders at the centre, independent
// seeded streams per replication, and 95% Student t intervals; the result
// does not depend on the number of workers.
//
// The model assumes independent, identically distributed demand per
// period at every store, fixed lead times, full backordering and an
// unlimited supplier. For critical items (medicines, safety spares) these
// are planning aids: local practice and regulation decide.
package network
