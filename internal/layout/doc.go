// Package layout holds no code: its test checks the project's dependency
// rule, that every package imports only packages on a lower floor of the
// data flow (grid at the bottom, the command line at the top), so that
// nothing imports upward. The floors are written out in the test.
package layout
