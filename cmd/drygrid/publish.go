package main

// Atomic publish of an output directory.
//
// A run writes every file into a fresh temporary directory BESIDE the output
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
// directories whose process is gone, or older than publishStaleAfter, are
// removed at the next run on the same OUT.
//
// drygrid's own files are the names in layerFiles, manifest.json, the files
// this run writes, and those listed in OUT's previous manifest.json; they
// are replaced, and an earlier layer that this run does not write (another
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
	"drygrid/manifest"
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

// publishStaleAfter is the age after which a temporary directory is removed
// even if a process with its pid exists (pids are reused).
const publishStaleAfter = time.Hour

const (
	publishTmpTag  = ".drygrid-tmp-"
	publishOldTag  = ".drygrid-old-"
	publishLockTag = ".drygrid-lock"
)

// publishPlan is one publication.
type publishPlan struct {
	Out    string          // the output directory
	Owned  map[string]bool // top-level names drygrid writes (replaced, never carried over)
	Inputs []string        // files this run read (always carried over if inside Out)
	// Write fills dir with the new files; it returns the names it wrote.
	Write func(dir string) error
}

// publishDir runs p.Write into a temporary directory beside p.Out and swaps
// it in when Write succeeds (see the file comment).
func publishDir(p publishPlan) error {
	out, err := publishTarget(p.Out)
	if err != nil {
		return err
	}
	parent, base := filepath.Dir(out), filepath.Base(out)
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return fmt.Errorf("output directory %s: %w", p.Out, err)
	}
	unlock, err := publishLock(parent, base, p.Out)
	if err != nil {
		return err
	}
	defer unlock()
	if err := publishRecover(parent, base); err != nil {
		return err
	}
	tmp, err := os.MkdirTemp(parent, "."+base+publishTmpTag+strconv.Itoa(os.Getpid())+"-")
	if err != nil {
		return fmt.Errorf("output directory %s: %w", p.Out, err)
	}
	done := false
	defer func() {
		if !done {
			os.RemoveAll(tmp)
		}
	}()
	if err := p.Write(tmp); err != nil {
		return err
	}
	mode := fs.FileMode(0o755)
	st, err := os.Stat(out)
	exists := err == nil
	if exists {
		mode = st.Mode().Perm()
		if err := publishCarryOver(out, tmp, p.Owned, p.Inputs); err != nil {
			return err
		}
	} else if !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("output directory %s: %w", p.Out, err)
	}
	if err := os.Chmod(tmp, mode); err != nil {
		return fmt.Errorf("output directory %s: %w", p.Out, err)
	}
	if !exists {
		if err := os.Rename(tmp, out); err != nil {
			return fmt.Errorf("publish %s: %w", p.Out, err)
		}
		done = true
		return nil
	}
	old := filepath.Join(parent, "."+base+publishOldTag+strconv.Itoa(os.Getpid())+"-"+publishRandom())
	if err := os.Rename(out, old); err != nil {
		return fmt.Errorf("publish %s: moving the previous directory aside: %w", p.Out, err)
	}
	if err := os.Rename(tmp, out); err != nil {
		if rerr := os.Rename(old, out); rerr != nil {
			return fmt.Errorf("publish %s: %v; the previous contents are in %s (rename it back: %v)", p.Out, err, old, rerr)
		}
		return fmt.Errorf("publish %s: %w", p.Out, err)
	}
	done = true
	if err := os.RemoveAll(old); err != nil {
		return fmt.Errorf("publish %s: published, but the previous directory %s was not removed: %w", p.Out, old, err)
	}
	return nil
}

// publishLock takes the lock of the output directory base in parent (see
// the file comment) and returns the function that releases it.
func publishLock(parent, base, out string) (unlock func(), err error) {
	path := filepath.Join(parent, "."+base+publishLockTag)
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

// publishTarget is the absolute directory to replace: Out itself, or the
// directory a symbolic link at Out points to. Out may not exist yet; it may
// not be a file, the root, or hold the working directory.
func publishTarget(out string) (string, error) {
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
		if rel, err := filepath.Rel(abs, wd); err == nil && !publishOutside(rel) {
			return "", fmt.Errorf("output directory %s holds the working directory; choose a directory outside it", out)
		}
	}
	return abs, nil
}

func publishRandom() string {
	var b [6]byte
	rand.Read(b[:])
	return hex.EncodeToString(b[:])
}

// publishRecover restores a previous directory left aside by a crash between
// the two renames, and removes stale temporary and old directories of base.
func publishRecover(parent, base string) error {
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
		for _, tag := range []string{publishTmpTag, publishOldTag} {
			prefix := "." + base + tag
			if !strings.HasPrefix(name, prefix) || !e.IsDir() {
				continue
			}
			if !publishStale(filepath.Join(parent, name), name[len(prefix):]) {
				continue
			}
			if tag == publishOldTag {
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

// publishStale reports whether a temporary directory with suffix "PID-RAND"
// belongs to no running process, or is older than publishStaleAfter.
func publishStale(path, suffix string) bool {
	if st, err := os.Stat(path); err == nil && time.Since(st.ModTime()) > publishStaleAfter {
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

// publishCarryOver hard-links every entry of out that drygrid does not own
// into tmp, recreating directories.
func publishCarryOver(out, tmp string, owned map[string]bool, inputs []string) error {
	keep := map[string]bool{}
	for _, in := range inputs {
		abs, err := filepath.Abs(in)
		if err != nil {
			continue
		}
		if rel, err := filepath.Rel(out, abs); err == nil && !publishOutside(rel) && rel != "." {
			keep[strings.Split(filepath.ToSlash(rel), "/")[0]] = true
		}
	}
	prev := map[string]bool{}
	if b, err := os.ReadFile(filepath.Join(out, manifest.Name)); err == nil {
		if names, err := manifest.ParseOutputs(filepath.Join(out, manifest.Name), b); err == nil {
			for _, n := range names {
				prev[strings.Split(n, "/")[0]] = true
			}
		}
	}
	entries, err := os.ReadDir(out)
	if err != nil {
		return fmt.Errorf("output directory %s: %w", out, err)
	}
	for _, e := range entries {
		name := e.Name()
		if !keep[name] && (owned[name] || prev[name] || publishLeftover(name)) {
			continue
		}
		dst := filepath.Join(tmp, name)
		if _, err := os.Lstat(dst); err == nil {
			return fmt.Errorf("output directory %s: %s is not drygrid's and would be overwritten; move it away", out, name)
		}
		if err := publishLink(filepath.Join(out, name), dst); err != nil {
			return fmt.Errorf("output directory %s: keeping %s (a file drygrid did not write): %w; move it out of the output directory", out, name, err)
		}
	}
	return nil
}

// publishLeftover recognises drygrid's own debris inside an output
// directory: the staging directories of earlier versions and temporary files
// of an interrupted atomic write of one of its files.
func publishLeftover(name string) bool {
	if strings.HasPrefix(name, ".drygrid-staging-") {
		return true
	}
	for _, files := range layerFiles {
		for _, f := range files {
			if strings.HasPrefix(name, "."+f+".tmp-") {
				return true
			}
		}
	}
	return strings.HasPrefix(name, "."+manifest.Name+".tmp-")
}

// publishLink recreates src at dst: directories are made anew, regular files
// hard-linked, symbolic links copied as links.
func publishLink(src, dst string) error {
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
			if err := publishLink(filepath.Join(src, e.Name()), filepath.Join(dst, e.Name())); err != nil {
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

// publishOutside reports whether a relative path (from filepath.Rel) leaves
// its base directory.
func publishOutside(rel string) bool {
	rel = filepath.ToSlash(rel)
	return rel == ".." || strings.HasPrefix(rel, "../") || filepath.IsAbs(rel)
}
