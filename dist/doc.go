// Package dist is the probability base of forkcast's uncertain inputs: the
// distributions an estimate is written as, their exact means where the mean
// is rational, three-point discretisation for exact analysis, correlated
// sampling, reproducible parallel random streams and the summary statistics
// of a simulation.
//
// # Distributions
//
// Each distribution is a small value type built by a constructor that checks
// its arguments and says in plain words what is wrong ([ArgError]):
// [PERT], [Triangular], [Uniform], [Normal], [LogNormal], [Discrete] and
// [Event] (a value that occurs only with some probability, as a risk in a
// register does). All satisfy [Distribution]. Formulas and their sources are
// in each method's doc comment; sampling, quantiles and CDFs come from
// gonum's stat/distuv.
//
// Every constructor comes in two forms: NewX takes float64 arguments, and
// NewXExact takes exact decimals as written in a model and keeps them, so
// that MeanExact can return the exact rational mean (the PERT mean
// (a + 4m + b)/6 of decimal arguments is rational, not always a finite
// decimal).
//
// A distribution whose arguments leave no spread (LOW = LIKELY = HIGH, or
// LOW = HIGH for a uniform) is a point: every draw and every quantile is that
// value. A three-point estimate with three equal figures is how a fixed
// quote is written in a register, so it is accepted rather than rejected.
// A normal needs a positive SD and a lognormal two distinct percentiles:
// those forms have no such use, and a zero spread there is most often a
// slip.
//
// # Sampling
//
// Rand draws with a caller's [math/rand/v2.Source]; Quantile maps a uniform
// variate to a draw, which stratified and rank-based schemes need.
// [Streams] gives each simulation run its own source that depends only on
// the seed and the run's index, and [ForEachRun] spreads runs over workers
// so that results are identical whatever the number of workers.
// [ImanConover] rearranges independently drawn columns so that they carry a
// target rank correlation ([Correlation]) while each column keeps its values.
//
// # Results
//
// [Discretise] turns a distribution into three values and weights
// (extended Swanson–Megill or extended Pearson–Tukey). [NewSample]
// summarises simulated values: mean, standard error, SD, percentiles (the
// smallest value whose cumulative proportion reaches p), probabilities of
// falling below or above a threshold and a histogram with deterministic
// edges.
//
// The package imports no other forkcast package and has no package-level
// mutable state.
package dist
