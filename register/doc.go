// Package register quantifies a risk register: the threats and
// opportunities a project has identified, each with a probability, an
// impact on cost (a figure or a distribution), optionally an impact on
// the schedule in days, an owner, a category and a planned response.
//
// A [Register] is a plain value. It comes from a spreadsheet ([ReadCSV]),
// from a register block of the text language ([FromModel], after
// lang.Load), or from Go code. [Analyse] turns it into an [Analysis]:
//
//   - each risk's expected impact (probability × mean impact) before and
//     after its response, exactly, and threats, opportunities and the net
//     apart;
//   - the total EMV: the contingency reserve by the expected-value method
//     (common practice);
//   - by Monte Carlo, the distribution of the total impact: mean, SD,
//     percentiles, the reserve needed at a chosen confidence and the
//     probability of staying within a budget;
//   - a ranking of the risks by what they add to the chosen percentile;
//   - the appraisal of each response (the reduction in expected impact
//     against its cost) and the best set of responses as a decision.
//
// Money in an analysis is cost: a threat's impact adds to the total, an
// opportunity's (written as a positive saving) takes from it, so a
// negative total is a net saving.
//
// Simulation is reproducible: the draws of risk i in run r depend only on
// the seed, i and r (dist.Streams), so the figures for a seed are the same
// whatever the number of workers, and removing a risk leaves the draws of
// the others as they were (which the ranking relies on).
//
// The package keeps no package-level mutable state.
package register
