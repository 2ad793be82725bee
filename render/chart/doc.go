// Package chart draws the charts of forkcast's analyses — tornado and
// spider diagrams, sweeps, two-way strategy maps, risk profiles and
// histograms of simulated values — through gonum's plot, as SVG or PNG.
//
// Each chart is a function that takes a plain data struct, which an
// analysis fills, and Options, and writes the picture to an io.Writer.
// Every chart shares one style: one sans-serif face, greys, a single
// accent colour for where the best option changes, and dash patterns,
// weights, markers and hatching so that nothing depends on colour alone
// and the chart reads when printed in greyscale. Legends sit beside or
// under the data, never over it. The same data and options give
// byte-identical output.
//
// The package knows nothing of trees or models: numbers come in as
// float64 (a chart needs no more precision than a pixel), labels as text.
package chart
