// Package publish holds the output directory: the last step of a run. A run
// writes its files into a staging directory beside the output directory
// (Begin, Stage.Dir) and swaps it in whole (Stage.Commit) or drops it
// (Stage.Abort), so a failed run leaves the earlier outputs untouched; an
// exclusive lock keeps two runs from publishing into the same directory, a
// directory left aside by a crash is put back by the next run, and files of
// the user's own in the output directory are carried over as hard links.
// WriteFile writes a single file atomically (temporary file, fsync, rename).
// publish is the only code of drygrid that renames or fsyncs.
package publish
