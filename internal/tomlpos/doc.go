// Package tomlpos finds where keys sit in a TOML document, so that errors
// about a decoded value (a bad colour, an unknown key, a resolution out of
// range) in a scheme or job file can name its line and column.
// BurntSushi/toml keeps key positions to itself; this is a line scanner that
// serves messages only: a key it cannot place is reported without a
// position, never misplaced silently. It is parser support for the packages
// that read TOML files (bands, and the job file of the command line) and
// imports no other package of the project.
package tomlpos
