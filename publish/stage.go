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
//  2. OUT is renamed aside to .OUT.drygrid-old-PID-RANDOM;
//  3. the temporary directory is renamed to OUT;
//  4. the old directory is removed (it holds only drygrid's earlier files
//     and the second links of the carried-over ones).
//
// Steps 2 and 3 are two renames. A crash between them leaves no OUT, the
// previous contents complete in .OUT.drygrid-old-* and the new ones in
// .OUT.drygrid-tmp-*; the next run on OUT renames the old directory back
// before it starts (or do it by hand: mv .OUT.drygrid-old-* OUT). A crash
// after step 3 leaves the old directory beside OUT; the next run removes it.
// A crash or an error before step 2 leaves OUT byte-identical. Temporary
// directories whose process is gone, or older than an hour, are
// removed at the next run on the same OUT.
//
// drygrid's own files are the names in Options.Owned (the layers' files,
// manifest.json and the run's extra files) and those its previous
// manifest.json lists (Options.Previous); they are replaced, and an earlier layer that this run does not write (another
// --layers choice) disappears, so OUT always matches its manifest. A file
// this run reads as an input is always carried over.
//
// Two runs never publish to the same OUT at the same time: a run holds an
// exclusive lock (flock) on the empty file .OUT.drygrid-lock beside OUT from
// before it recovers or writes anything until the swap is done, and a
// second run on OUT stops at once with an error (exit code 1) naming the
// lock. The system drops the lock when the process ends, however it ends,
// so a crash leaves no stale lock; the file itself stays, harmless.

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
}

// Begin locks the output directory out (creating its parent), recovers
// from an earlier crash and makes a fresh staging directory beside out.
// Write the new files into Dir, then Commit to swap them in or Abort to
// drop them; either releases the lock.
func Begin(out string, opt Options) (*Stage, error) {
	abs, err := target(out)
	if err != nil {
		return nil, err
	}
	parent, base := filepath.Dir(abs), filepath.Base(abs)
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return nil, fmt.Errorf("output directory %s: %w", out, err)
	}
	unlock, err := lock(parent, base, out)
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

// Abort removes the staging directory and releases the lock, leaving the
// output directory as it was. It does nothing after Commit or Abort.
func (s *Stage) Abort() {
	if s.done {
		return
	}
	s.done = true
	os.RemoveAll(s.dir)
	s.unlock()
}

// Commit carries the files the writer does not own over into the staging
// directory (as hard links) and swaps it in place of the output directory
// (see the file comment). On an error before the swap the output
// directory is left as it was and the staging directory is removed.
func (s *Stage) Commit() error {
	if s.done {
		return fmt.Errorf("publish %s: already committed or aborted", s.out)
	}
	swapped, err := s.swap()
	if !swapped {
		os.RemoveAll(s.dir)
	}
	s.done = true
	s.unlock()
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

// swap is Commit's work; swapped reports whether the staging directory
// has become the output directory.
func (s *Stage) swap() (swapped bool, err error) {
	out, tmp := s.abs, s.dir
	parent, base := filepath.Dir(out), filepath.Base(out)
	owned := map[string]bool{}
	for _, name := range s.opt.Owned {
		owned[name] = true
	}
	mode := fs.FileMode(0o755)
	st, err := os.Stat(out)
	exists := err == nil
	if exists {
		mode = st.Mode().Perm()
		if err := carryOver(out, tmp, owned, s.opt); err != nil {
			return false, err
		}
	} else if !errors.Is(err, fs.ErrNotExist) {
		return false, fmt.Errorf("output directory %s: %w", s.out, err)
	}
	if err := os.Chmod(tmp, mode); err != nil {
		return false, fmt.Errorf("output directory %s: %w", s.out, err)
	}
	if !exists {
		if err := os.Rename(tmp, out); err != nil {
			return false, fmt.Errorf("publish %s: %w", s.out, err)
		}
		return true, nil
	}
	old := filepath.Join(parent, "."+base+oldTag+strconv.Itoa(os.Getpid())+"-"+random())
	if err := os.Rename(out, old); err != nil {
		return false, fmt.Errorf("publish %s: moving the previous directory aside: %w", s.out, err)
	}
	if err := os.Rename(tmp, out); err != nil {
		if rerr := os.Rename(old, out); rerr != nil {
			return false, fmt.Errorf("publish %s: %v; the previous contents are in %s (rename it back: %v)", s.out, err, old, rerr)
		}
		return false, fmt.Errorf("publish %s: %w", s.out, err)
	}
	if err := os.RemoveAll(old); err != nil {
		return true, fmt.Errorf("publish %s: published, but the previous directory %s was not removed: %w", s.out, old, err)
	}
	return true, nil
}

// lock takes the lock of the output directory base in parent (see
// the file comment) and returns the function that releases it.
func lock(parent, base, out string) (unlock func(), err error) {
	path := filepath.Join(parent, "."+base+LockTag)
	f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE, 0o644)
	if err != nil {
		return nil, fmt.Errorf("output directory %s: lock: %w", out, err)
	}
	if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
		f.Close()
		if errors.Is(err, syscall.EWOULDBLOCK) {
			return nil, fmt.Errorf("output directory %s: another drygrid run is writing it (it holds %s); run again when that one has ended", out, path)
		}
		return nil, fmt.Errorf("output directory %s: lock %s: %w", out, path, err)
	}
	return func() {
		syscall.Flock(int(f.Fd()), syscall.LOCK_UN)
		f.Close()
	}, nil
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
			if !stale(filepath.Join(parent, name), name[len(prefix):]) {
				continue
			}
			if tag == oldTag {
				olds = append(olds, name)
			} else {
				os.RemoveAll(filepath.Join(parent, name))
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
		}
		return nil
	}
	for _, name := range olds {
		os.RemoveAll(filepath.Join(parent, name))
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
	if strings.HasPrefix(name, ".drygrid-staging-") {
		return true
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
		return os.Symlink(target, dst)
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
		if err := os.Chmod(dst, st.Mode().Perm()); err != nil {
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
