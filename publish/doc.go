// Package publish holds the output directory: the last step of a run. A run
// begins a stage before its work (Begin: the output directory checked for
// writing, locked, recovered from an earlier crash), writes its files into
// a staging directory beside the output directory (Stage.Dir) and swaps it
// in whole (Stage.Commit; an atomic exchange where the kernel has one) or
// drops it (Stage.Abort), so a failed run leaves the earlier outputs
// untouched; the exclusive lock keeps two runs from working on the same
// directory, and files of the user's own in the output directory are
// carried over as hard links, with their directories' owners and modes.
// Lock is that lock for any file (the history uses it), removed when
// released, so no lock file stays behind. WriteFile writes a single file
// atomically (temporary file, fsync, rename). publish is the only code of
// drygrid that renames or fsyncs.
package publish
