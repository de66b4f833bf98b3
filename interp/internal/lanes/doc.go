// Package lanes is the kernel of interp's grid in its common case (power 2,
// a radius of up to 337 km, no sectors): four neighbouring cells of a row
// at once, one cell per vector lane, over the stations of their spans (a
// cell's span is the range of the row's stations, in longitude order, that
// its search circle can reach). A Group is one call: the row's station
// columns and cell columns, set once a row, and the offsets of its
// stations and cells (J0, C0). Chords, the first pass, finds per cell the
// chords squared on the unit sphere to the stations of its span within a
// limit, their count and the Kept largest; KthChord gives the k-th
// smallest where more than k+Kept-1 count; Sums, the second pass, takes
// per cell Shepard's (1968) sums with weight 1/theta^2 (theta the central
// angle) over the stations within its chord Tau, their count and the
// smallest and largest value. It runs in AVX2 assembly (kernel_amd64.s)
// where the processor has AVX2 and FMA, else, off amd64 and with the
// purego build tag, in Go (chordsGo, sumsGo), which is the definition: the
// two give the same bits, so a cell's value depends neither on the
// processor nor on the cells it is grouped with. The 1 m rule, ties at the
// k-th distance and the coverage rule are interp's: it reads the counts
// and sums and goes through its candidate list where they do not settle a
// cell.
package lanes
