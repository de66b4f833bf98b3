package publish

// Atomic publish of an output directory.
//
// A run (Begin) writes every file into a fresh temporary directory BESIDE the output
// directory OUT (same parent, so renames stay on one file system), named
// .OUT.drygrid-tmp-PID-RANDOM. Only when every layer and the manifest are
// complete is it swapped in:
//
//  1. files in OUT that drygrid did not write (a user's notes, the demo's
//     inputs/, a history file kept there) are carried over into the
//     temporary directory as HARD LINKS, so no data is copied or moved and
//     the originals stay in OUT until the swap is done; a file that cannot be
//     hard-linked (another file system mounted inside OUT, a file system
//     without hard links, a device or socket) makes the run stop with an
//     error before anything is touched, rather than being copied or dropped;
//  2. the temporary directory and OUT are exchanged in one step
//     (renameat2 with RENAME_EXCHANGE, Linux 3.15 and most local file
//     systems), so OUT is never missing; the previous contents, now under
//     the temporary name, are removed. Where the exchange is not available
//     it is two renames: OUT aside to .OUT.drygrid-old-PID-RANDOM, then
//     the temporary directory to OUT, and the old directory removed;
//  3. the parent directory is synced, so the renames are on disk.
//
// OUT keeps its owner and group (as far as the process may set them: root
// always, a user the group of a directory it owns if a member), its mode
// bits with setgid and sticky, and so do the user's subdirectories
// carried over.
//
// A crash between the two renames leaves no OUT, the previous contents
// complete in .OUT.drygrid-old-* and the new ones in .OUT.drygrid-tmp-*;
// the next run on OUT renames the old directory back in Begin, before it
// reads its inputs, so even a run that then fails on bad input restores it
// (or do it by hand: mv .OUT.drygrid-old-* OUT). A crash after the swap
// leaves the previous directory beside OUT; the next run removes it
// (making its directories writable if needed, so none stays behind). A
// crash or an error before the swap leaves OUT byte-identical. Temporary
// directories whose process is gone, or older than an hour, are removed
// at the next run on the same OUT.
//
// Begin refuses, before any work, an OUT whose parent is not writable and
// an existing OUT that is read-only: one whose owner lacks the write bit
// (the rule holds for root too, whom access(2) lets write anything) or
// that access(2) says the process may not write.
//
// drygrid's own files are the names in Options.Owned (the layers' files,
// manifest.json and the run's extra files) and those its previous
// manifest.json lists (Options.Previous); they are replaced, and an earlier layer that this run does not write (another
// --layers choice) disappears, so OUT always matches its manifest. A file
// this run reads as an input is always carried over.
//
// Two runs never work on the same OUT at the same time: a run holds an
// exclusive lock (flock) on the file .OUT.drygrid-lock beside OUT from
// Begin, before it reads or computes anything, until the swap is done, and
// a second run on OUT stops at once with an error (exit code 1) naming the
// holder's pid and the lock file. The lock file holds the pid and is
// removed when the lock is released (Lock), so nothing stays beside OUT;
// the system drops the lock when the process ends, however it ends, so a
// crash leaves no stale lock, only the file, which the next run takes over
// and removes.

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"
)

// staleAfter is the age after which a temporary directory is removed
// even if a process with its pid exists (pids are reused).
const staleAfter = time.Hour

const (
	tmpTag  = ".drygrid-tmp-"
	oldTag  = ".drygrid-old-"
	LockTag = ".drygrid-lock"
)

// Options say which names of the output directory the writer owns.
type Options struct {
	// Owned are the top-level names the writer writes: they are replaced,
	// never carried over (with those of the previous manifest.json).
	Owned []string
	// Inputs are files the run reads; one inside the output directory is
	// always carried over.
	Inputs []string
	// Previous, when not nil, lists the names an earlier run recorded as
	// its outputs in dir (the output directory as it is): they are the
	// writer's too and are not carried over.
	Previous func(dir string) []string
}

// Stage is a staging directory beside an output directory, holding the
// output directory's lock from Begin until Commit or Abort.
type Stage struct {
	out    string // as given, for messages
	abs    string // the directory replaced
	dir    string // the staging directory
	opt    Options
	unlock func()
	done   bool
	// swapped: the staging directory has become the output directory
	swapped bool
}

// Begin checks that the output directory out (and its parent, created if
// missing) can be written, locks it, recovers from an earlier crash and
// makes a fresh staging directory beside out. Call it before the work, so
// that a second run on out, a read-only directory or the remains of a
// crash are dealt with before anything is read or computed. Write the new
// files into Dir, then Commit to swap them in or Abort to drop them;
// either releases the lock (Swap and Close split Commit, to do more under
// the lock after the swap).
func Begin(out string, opt Options) (*Stage, error) {
	abs, err := target(out)
	if err != nil {
		return nil, err
	}
	parent, base := filepath.Dir(abs), filepath.Base(abs)
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return nil, fmt.Errorf("output directory %s: %w", out, err)
	}
	if err := checkWritable(parent, abs, out); err != nil {
		return nil, err
	}
	unlock, err := lockOut(parent, base, out)
	if err != nil {
		return nil, err
	}
	if err := recoverDir(parent, base); err != nil {
		unlock()
		return nil, err
	}
	tmp, err := os.MkdirTemp(parent, "."+base+tmpTag+strconv.Itoa(os.Getpid())+"-")
	if err != nil {
		unlock()
		return nil, fmt.Errorf("output directory %s: %w", out, err)
	}
	return &Stage{out: out, abs: abs, dir: tmp, opt: opt, unlock: unlock}, nil
}

// Dir is the staging directory the new files go into.
func (s *Stage) Dir() string { return s.dir }

// SetOptions replaces the options given to Begin (what the writer owns
// is often known only once the work is done); the swap uses them.
func (s *Stage) SetOptions(opt Options) { s.opt = opt }

// Abort removes the staging directory and releases the lock, leaving the
// output directory as it was. It does nothing after Commit or Abort.
func (s *Stage) Abort() { s.Close() }

// Close releases the lock; before a swap it also removes the staging
// directory, leaving the output directory as it was. Again does nothing.
func (s *Stage) Close() {
	if s.done {
		return
	}
	s.done = true
	if !s.swapped {
		os.RemoveAll(s.dir)
	}
	s.unlock()
}

// Commit swaps the staging directory in (Swap) and releases the lock.
func (s *Stage) Commit() error {
	if s.done {
		return fmt.Errorf("publish %s: already committed or aborted", s.out)
	}
	err := s.Swap()
	s.Close()
	return err
}

// Swap carries the files the writer does not own over into the staging
// directory (as hard links) and swaps it in place of the output directory
// (see the file comment), keeping the lock until Close. On an error before
// the swap the output directory is left as it was.
func (s *Stage) Swap() error {
	if s.done || s.swapped {
		return fmt.Errorf("publish %s: already committed or aborted", s.out)
	}
	swapped, err := s.swap()
	s.swapped = swapped
	return err
}

// Dir writes the files of write into a staging directory beside out and
// swaps it in when write succeeds: Begin, write, Commit.
func Dir(out string, opt Options, write func(dir string) error) error {
	s, err := Begin(out, opt)
	if err != nil {
		return err
	}
	if err := write(s.Dir()); err != nil {
		s.Abort()
		return err
	}
	return s.Commit()
}

// Fault, for tests only, when not nil, is called at the named points of a
// swap; an error it returns stops the swap there as a crash would, with
// nothing undone. Its one point is "aside": the output directory has been
// renamed aside and the staging directory not yet renamed in its place (a
// Fault forces the two renames instead of an exchange).
var Fault func(point string) error

// swap is Swap's work; swapped reports whether the staging directory
// has become the output directory.
func (s *Stage) swap() (swapped bool, err error) {
	out, tmp := s.abs, s.dir
	parent, base := filepath.Dir(out), filepath.Base(out)
	owned := map[string]bool{}
	for _, name := range s.opt.Owned {
		owned[name] = true
	}
	st, err := os.Stat(out)
	if errors.Is(err, fs.ErrNotExist) {
		mode := fs.FileMode(0o755)
		if st, err := os.Stat(tmp); err == nil {
			mode |= st.Mode() & fs.ModeSetgid // inherited from a setgid parent
		}
		if err := os.Chmod(tmp, mode); err != nil {
			return false, fmt.Errorf("output directory %s: %w", s.out, err)
		}
		if err := os.Rename(tmp, out); err != nil {
			return false, fmt.Errorf("publish %s: %w", s.out, err)
		}
		syncDir(parent)
		return true, nil
	}
	if err != nil {
		return false, fmt.Errorf("output directory %s: %w", s.out, err)
	}
	if err := carryOver(out, tmp, owned, s.opt); err != nil {
		return false, err
	}
	// The directory's owner, group and mode bits (setgid, sticky) are kept.
	if err := keepAttrs(tmp, st); err != nil {
		return false, fmt.Errorf("output directory %s: %w", s.out, err)
	}
	if Fault == nil {
		// One atomic exchange where the kernel and the file system have
		// it: the output directory is never missing, and the previous one
		// ends up under the staging name, removed next.
		if ok, err := exchange(tmp, out); ok {
			syncDir(parent)
			if err := removeTree(tmp); err != nil {
				return true, fmt.Errorf("publish %s: published, but the previous directory (now %s) was not removed: %w", s.out, tmp, err)
			}
			return true, nil
		} else if err != nil {
			return false, fmt.Errorf("publish %s: %w", s.out, err)
		}
	}
	old := filepath.Join(parent, "."+base+oldTag+strconv.Itoa(os.Getpid())+"-"+random())
	if err := os.Rename(out, old); err != nil {
		return false, fmt.Errorf("publish %s: moving the previous directory aside: %w", s.out, err)
	}
	if Fault != nil {
		if err := Fault("aside"); err != nil {
			return false, err
		}
	}
	if err := os.Rename(tmp, out); err != nil {
		if rerr := os.Rename(old, out); rerr != nil {
			return false, fmt.Errorf("publish %s: %v; the previous contents are in %s (rename it back: %v)", s.out, err, old, rerr)
		}
		return false, fmt.Errorf("publish %s: %w", s.out, err)
	}
	syncDir(parent)
	if err := removeTree(old); err != nil {
		return true, fmt.Errorf("publish %s: published, but the previous directory %s was not removed: %w", s.out, old, err)
	}
	return true, nil
}

// syncDir puts a directory's entries (the renames in it) on disk; an
// error is ignored (some file systems cannot sync a directory).
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}

// lockOut takes the lock of the output directory base in parent (see
// the file comment) and returns the function that releases it.
func lockOut(parent, base, out string) (unlock func(), err error) {
	path := filepath.Join(parent, "."+base+LockTag)
	unlock, err = Lock(path, false)
	var busy *BusyError
	if errors.As(err, &busy) {
		return nil, fmt.Errorf("another drygrid run is writing %s (%s); run again when that one has ended", out, busy.holder())
	}
	if err != nil {
		return nil, fmt.Errorf("output directory %s: lock %s: %w", out, path, err)
	}
	return unlock, nil
}

// checkWritable refuses, before any work, an output directory that could
// not be replaced: the directory it is in must be writable, and an
// existing output directory too. The rule is the directory's mode bits
// as well as access(2): a directory whose owner has no write permission
// is read-only, even for root (who could write it regardless), since its
// owner marked it so.
func checkWritable(parent, abs, out string) error {
	if err := writableDir(parent); err != nil {
		return fmt.Errorf("output directory %s: the directory it is in, %s, %v; drygrid writes beside the output directory: make it writable or choose another output directory", out, parent, err)
	}
	if st, err := os.Stat(abs); err == nil && st.IsDir() {
		if err := writableDir(abs); err != nil {
			return fmt.Errorf("output directory %s %v; drygrid replaces it as a whole: make it writable (chmod u+w %s) or choose another output directory", out, err, out)
		}
	}
	return nil
}

// writableDir checks a directory's owner write bit and access(2) for
// writing and searching.
func writableDir(dir string) error {
	st, err := os.Stat(dir)
	if err != nil {
		return err
	}
	if st.Mode().Perm()&0o200 == 0 {
		return fmt.Errorf("is read-only (mode %v)", st.Mode().Perm())
	}
	if err := access(dir); err != nil {
		return fmt.Errorf("is not writable (%v)", err)
	}
	return nil
}

// removeTree removes a directory tree; where that fails (a directory
// without write permission, for a user other than root) it makes the
// directories writable and tries again, so that no previous directory is
// left behind.
func removeTree(path string) error {
	if err := os.RemoveAll(path); err == nil {
		return nil
	}
	filepath.WalkDir(path, func(p string, d fs.DirEntry, err error) error {
		if err == nil && d.IsDir() {
			if st, err := os.Lstat(p); err == nil {
				os.Chmod(p, st.Mode().Perm()|0o700)
			}
		}
		return nil
	})
	return os.RemoveAll(path)
}

// keepAttrs gives dir the owner, group and mode bits (with setuid, setgid
// and sticky) of st, as far as the process may: only root may give a file
// away, and a user only to a group of its own; what is not permitted is
// left as made.
func keepAttrs(dir string, st fs.FileInfo) error {
	if sys, ok := st.Sys().(*syscall.Stat_t); ok {
		if err := os.Lchown(dir, int(sys.Uid), int(sys.Gid)); err != nil {
			os.Lchown(dir, -1, int(sys.Gid)) // the group alone, if a member
		}
	}
	return os.Chmod(dir, st.Mode()&(fs.ModePerm|fs.ModeSetuid|fs.ModeSetgid|fs.ModeSticky))
}

// target is the absolute directory to replace: Out itself, or the
// directory a symbolic link at Out points to. Out may not exist yet; it may
// not be a file, the root, or hold the working directory.
func target(out string) (string, error) {
	abs, err := filepath.Abs(out)
	if err != nil {
		return "", fmt.Errorf("output directory %s: %w", out, err)
	}
	if st, err := os.Lstat(abs); err == nil {
		if st.Mode()&fs.ModeSymlink != 0 {
			if abs, err = filepath.EvalSymlinks(abs); err != nil {
				return "", fmt.Errorf("output directory %s: %w", out, err)
			}
			if st, err = os.Stat(abs); err != nil {
				return "", fmt.Errorf("output directory %s: %w", out, err)
			}
		}
		if !st.IsDir() {
			return "", fmt.Errorf("output directory %s: exists and is not a directory", out)
		}
	}
	if filepath.Dir(abs) == abs {
		return "", fmt.Errorf("output directory %s: the root cannot be replaced; choose a directory below it", out)
	}
	if wd, err := os.Getwd(); err == nil {
		if rel, err := filepath.Rel(abs, wd); err == nil && !outside(rel) {
			return "", fmt.Errorf("output directory %s holds the working directory; choose a directory outside it", out)
		}
	}
	return abs, nil
}

func random() string {
	var b [6]byte
	rand.Read(b[:])
	return hex.EncodeToString(b[:])
}

// recoverDir restores a previous directory left aside by a crash between
// the two renames, and removes stale temporary and old directories of base.
func recoverDir(parent, base string) error {
	entries, err := os.ReadDir(parent)
	if err != nil {
		return fmt.Errorf("output directory %s: %w", filepath.Join(parent, base), err)
	}
	out := filepath.Join(parent, base)
	_, statErr := os.Lstat(out)
	outMissing := errors.Is(statErr, fs.ErrNotExist)
	var olds []string
	for _, e := range entries {
		name := e.Name()
		for _, tag := range []string{tmpTag, oldTag} {
			prefix := "." + base + tag
			if !strings.HasPrefix(name, prefix) || !e.IsDir() {
				continue
			}
			// With OUT missing every old directory is a candidate: the lock
			// is held, so no run is between its renames now.
			if !(tag == oldTag && outMissing) && !stale(filepath.Join(parent, name), name[len(prefix):]) {
				continue
			}
			if tag == oldTag {
				olds = append(olds, name)
			} else {
				removeTree(filepath.Join(parent, name))
			}
		}
	}
	if outMissing && len(olds) > 0 {
		// The crash came between the renames: put the previous directory
		// back. With several (repeated crashes), the most recently
		// modified is restored and the others are left for the user.
		newest, newestTime := "", time.Time{}
		for _, name := range olds {
			if st, err := os.Stat(filepath.Join(parent, name)); err == nil && (newest == "" || st.ModTime().After(newestTime)) {
				newest, newestTime = name, st.ModTime()
			}
		}
		if newest != "" {
			path := filepath.Join(parent, newest)
			if err := os.Rename(path, out); err != nil {
				return fmt.Errorf("output directory %s: restoring %s: %w", out, path, err)
			}
			syncDir(parent)
		}
		return nil
	}
	for _, name := range olds {
		removeTree(filepath.Join(parent, name))
	}
	return nil
}

// stale reports whether a temporary directory with suffix "PID-RAND"
// belongs to no running process, or is older than staleAfter.
func stale(path, suffix string) bool {
	if st, err := os.Stat(path); err == nil && time.Since(st.ModTime()) > staleAfter {
		return true
	}
	pidStr, _, _ := strings.Cut(suffix, "-")
	pid, err := strconv.Atoi(pidStr)
	if err != nil || pid <= 0 {
		return true // not one of ours by name format; only age would keep it
	}
	if pid == os.Getpid() {
		return false
	}
	proc, err := os.FindProcess(pid)
	if err != nil {
		return true
	}
	err = proc.Signal(syscall.Signal(0))
	return errors.Is(err, os.ErrProcessDone) || errors.Is(err, syscall.ESRCH)
}

// carryOver hard-links every entry of out that drygrid does not own
// into tmp, recreating directories.
func carryOver(out, tmp string, owned map[string]bool, opt Options) error {
	keep := map[string]bool{}
	for _, in := range opt.Inputs {
		abs, err := filepath.Abs(in)
		if err != nil {
			continue
		}
		if rel, err := filepath.Rel(out, abs); err == nil && !outside(rel) && rel != "." {
			keep[strings.Split(filepath.ToSlash(rel), "/")[0]] = true
		}
	}
	prev := map[string]bool{}
	if opt.Previous != nil {
		for _, n := range opt.Previous(out) {
			prev[strings.Split(n, "/")[0]] = true
		}
	}
	entries, err := os.ReadDir(out)
	if err != nil {
		return fmt.Errorf("output directory %s: %w", out, err)
	}
	for _, e := range entries {
		name := e.Name()
		if !keep[name] && (owned[name] || prev[name] || leftover(name, owned)) {
			continue
		}
		dst := filepath.Join(tmp, name)
		if _, err := os.Lstat(dst); err == nil {
			return fmt.Errorf("output directory %s: %s is not drygrid's and would be overwritten; move it away", out, name)
		}
		if err := link(filepath.Join(out, name), dst); err != nil {
			return fmt.Errorf("output directory %s: keeping %s (a file drygrid did not write): %w; move it out of the output directory", out, name, err)
		}
	}
	return nil
}

// leftover recognises drygrid's own debris inside an output
// directory: the staging directories of earlier versions and temporary files
// of an interrupted atomic write of one of its files.
func leftover(name string, owned map[string]bool) bool {
	if strings.HasPrefix(name, ".drygrid-staging-") || strings.HasSuffix(name, LockTag) {
		return true // a lock file of a history kept there is the lock's, not the user's
	}
	for f := range owned {
		if strings.HasPrefix(name, "."+f+".tmp-") {
			return true
		}
	}
	return false
}

// link recreates src at dst: directories are made anew, regular files
// hard-linked, symbolic links copied as links.
func link(src, dst string) error {
	st, err := os.Lstat(src)
	if err != nil {
		return err
	}
	switch {
	case st.Mode()&fs.ModeSymlink != 0:
		target, err := os.Readlink(src)
		if err != nil {
			return err
		}
		if err := os.Symlink(target, dst); err != nil {
			return err
		}
		if sys, ok := st.Sys().(*syscall.Stat_t); ok {
			os.Lchown(dst, int(sys.Uid), int(sys.Gid)) // as far as permitted
		}
		return nil
	case st.IsDir():
		if err := os.Mkdir(dst, st.Mode().Perm()|0o700); err != nil {
			return err
		}
		entries, err := os.ReadDir(src)
		if err != nil {
			return err
		}
		for _, e := range entries {
			if err := link(filepath.Join(src, e.Name()), filepath.Join(dst, e.Name())); err != nil {
				return err
			}
		}
		if err := keepAttrs(dst, st); err != nil {
			return err
		}
		return os.Chtimes(dst, st.ModTime(), st.ModTime())
	case st.Mode().IsRegular():
		return os.Link(src, dst)
	}
	return fmt.Errorf("%s is not a regular file, directory or symbolic link", src)
}

// outside reports whether a relative path (from filepath.Rel) leaves
// its base directory.
func outside(rel string) bool {
	rel = filepath.ToSlash(rel)
	return rel == ".." || strings.HasPrefix(rel, "../") || filepath.IsAbs(rel)
}
