// Package sim is an independent Monte Carlo simulator of the periodic-review
// inventory system: it plays the events of each period one by one (review,
// receive, demand, end-of-period charges) and reports every long-run figure
// as a mean across independent replications with a Student t confidence
// interval.
//
// The simulator shares only the demand distribution and the policy's order
// rule (policies.Policy.Order) with the exact engine, so that each checks the
// other. It never builds a Markov chain.
//
// # Events of a period
//
// With on-hand stock OH, backorders BO and the orders outstanding, period t
// runs as follows.
//
//  1. Review: the inventory position IP = OH + on-order - BO is computed, the
//     policy orders q = Order(IP); a fixed cost K is incurred when q > 0 and
//     a purchase cost c per unit ordered.
//  2. Receive: the order placed at the review of period t-L arrives (with
//     L = 0 the order just placed); random lead times below.
//  3. Demand D_t is drawn and served from on-hand stock. In backorder mode
//     the arrival first clears outstanding backorders and the unserved
//     demand is backordered; in lost mode the unserved demand is lost.
//  4. Charges: h per unit on hand at the end of the period; b per unit
//     backordered at the end of the period, or b per unit lost in it.
//
// # Random lead times and the review period
//
// When the System has a lead-time law (System.LeadTimeLaw) or a review
// period R > 1, the events are played literally from the law, again
// sharing nothing with the exact engine but the law itself:
//
//   - Review only in periods 0, R, 2R, ... of the replication (counted
//     from its first period, warm-up included); costs and every figure
//     stay per period, so the order frequency is orders over periods.
//   - Sequential deliveries (the default model): each period draws a
//     cut-off T from the law P(T <= l) = P(L = l)/P(L >= l) of
//     inventory.KaplanCutoff, and every outstanding order placed at least
//     T periods ago arrives (Kaplan, "A dynamic inventory model with
//     stochastic lead times", Management Science 16(7), 1970). Orders
//     therefore arrive in the order placed, and an order's lead time has
//     the given law.
//   - Independent lead times (inventory.Independent): each order draws
//     its own lead time from the law when it is placed; a later order may
//     arrive first.
//
// The lead-time law is tabulated as the System cuts it (its tails below
// inventory.LeadTimeNeglect joined to the end points) and drawn by the
// alias method; the orders outstanding sit in a ring of lmax+1 slots, lmax
// the largest lead time, so every period costs O(1) (amortised O(1) for
// the sequential receipts). A fixed lead time with R = 1 keeps the
// original loop, so its figures are unchanged for a given seed.
//
// Each replication starts with the inventory position at the policy's top
// level (all of it on hand, nothing on order) and discards a warm-up of
// periods before it starts counting.
//
// # Figures and intervals
//
// Within a replication every figure is a ratio of exact integer sums over
// the counted periods: the fill rate is units served at once over units
// demanded (in backorder mode "at once" means min(D, on-hand after the
// arrival has cleared backorders)), the mean order quantity is units ordered
// over orders placed, and the other figures are sums divided by the number
// of periods. Each figure is then averaged across the R replications and
// given the half-width t_{1-α/2,R-1} s/√R of the confidence interval of a
// mean from R independent replications (the replication/deletion approach
// for steady-state means; A. M. Law, Simulation Modeling and Analysis, 5th
// ed., 2015, chapter 9, cited from memory), with the t quantile from gonum's distuv.StudentsT. The
// ratio figures are therefore averages of per-replication ratios; their bias
// is of order 1/n in the number n of counted periods and is negligible
// against the interval at the run lengths used.
//
// # Random numbers
//
// Demand is drawn in O(1) by the alias method (A. J. Walker, "An efficient
// method for generating discrete random variables with general
// distributions", ACM TOMS 3, 1977; table built as in M. D. Vose, "A linear
// algorithm for generating random numbers with a given distribution", IEEE
// TSE 17, 1991) over the values 0..K with P(D > K) <= 1e-16, plus one cell
// for the event D > K, which is resolved by inverting the exact tail
// function of the distribution, so no demand is ever truncated. A Poisson,
// negative binomial, discretised normal or gamma law whose K passes 2^16 is
// drawn in O(1) with no table, exactly from the law: Poisson by the
// transformed rejection method PTRS (W. Hörmann, "The transformed rejection
// method for generating Poisson random variables", Insurance: Mathematics
// and Economics 12, 1993), the negative binomial as a gamma mixture of
// Poissons, the discretised laws by rounding the continuous variate as
// the SPEC defines (gamma by G. Marsaglia and W. W. Tsang, ACM TOMS 26,
// 2000; normal by the polar method). Every
// replication draws from its own PCG generator (M. E. O'Neill, "PCG: a
// family of simple fast space-efficient statistically good algorithms for
// random number generation", 2014; math/rand/v2.PCG) seeded with two
// consecutive outputs of SplitMix64 (G. L. Steele, D. Lea, C. H. Flood,
// "Fast splittable pseudorandom number generators", OOPSLA 2014) started at
// the user's seed, so results depend only on the seed and the replication
// index, never on the number of workers.
//
// # Limits
//
// Check (and Run, first) estimates memory, the period count and the range
// of the int64 sums before anything is allocated and refuses with a
// *LimitError naming the input; see Options.PeriodBudget and MaxBytes.
package sim
