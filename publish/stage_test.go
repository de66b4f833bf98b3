//go:build unix

package publish

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"sync/atomic"
	"syscall"
	"testing"
	"time"
)

// layerNames are the names the writer of these tests owns, as a grid run's.
var layerNames = []string{"index.tif", "bands.tif", "bands.tif.aux.xml", "map.png", "manifest.json"}

// manifestOutputs stands for the manifest's list of outputs: the files of
// the previous publication are listed in a file "outputs", one a line.
func manifestOutputs(dir string) []string {
	b, err := os.ReadFile(filepath.Join(dir, "outputs"))
	if err != nil {
		return nil
	}
	return strings.Fields(string(b))
}

// publishFiles publishes the named files (content = name) into out, as a
// run writing those layers would; it fails with fail.
func publishFiles(out string, names []string, fail error, inputs ...string) error {
	opt := Options{Owned: append(layerNames, "outputs"), Inputs: inputs, Previous: manifestOutputs}
	return Dir(out, opt, func(dir string) error {
		for _, n := range names {
			if err := os.WriteFile(filepath.Join(dir, n), []byte(n), 0o644); err != nil {
				return err
			}
		}
		if fail != nil {
			return fail
		}
		return os.WriteFile(filepath.Join(dir, "outputs"), []byte(strings.Join(names, "\n")), 0o644)
	})
}

// hashDir maps each file under dir to its content.
func hashDir(t *testing.T, dir string) map[string]string {
	t.Helper()
	m := map[string]string{}
	filepath.WalkDir(dir, func(path string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, path)
		m[rel] = string(b)
		return nil
	})
	return m
}

var all = []string{"index.tif", "bands.tif", "map.png"}

// parentLeftovers lists the hidden publish files beside out: staging and
// old directories, and the lock file, which is removed with the lock.
func parentLeftovers(t *testing.T, out string) []string {
	t.Helper()
	entries, err := os.ReadDir(filepath.Dir(out))
	if err != nil {
		t.Fatal(err)
	}
	var left []string
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), "."+filepath.Base(out)+".drygrid-") {
			left = append(left, e.Name())
		}
	}
	return left
}

// TestPublishKeepsUserFiles: files drygrid did not write survive a run, as
// hard links to the very same files (nothing copied); a layer the new run
// does not write disappears, so the directory matches its manifest.
func TestPublishKeepsUserFiles(t *testing.T) {
	out := filepath.Join(t.TempDir(), "layers")
	if err := publishFiles(out, all, nil); err != nil {
		t.Fatal(err)
	}
	notes := filepath.Join(out, "notes.txt")
	os.WriteFile(notes, []byte("my notes"), 0o600)
	os.MkdirAll(filepath.Join(out, "mine", "deep"), 0o755)
	os.WriteFile(filepath.Join(out, "mine", "deep", "x.csv"), []byte("a,b\n"), 0o644)
	os.Symlink("notes.txt", filepath.Join(out, "link"))
	before, _ := os.Stat(notes)
	if err := publishFiles(out, []string{"index.tif"}, nil); err != nil {
		t.Fatal(err)
	}
	after, err := os.Stat(notes)
	if err != nil || !os.SameFile(before, after) {
		t.Fatalf("notes.txt not kept as the same file: %v", err)
	}
	if after.Mode().Perm() != 0o600 {
		t.Errorf("notes.txt mode %v", after.Mode())
	}
	if b, err := os.ReadFile(filepath.Join(out, "mine", "deep", "x.csv")); err != nil || string(b) != "a,b\n" {
		t.Errorf("mine/deep/x.csv: %q, %v", b, err)
	}
	if target, err := os.Readlink(filepath.Join(out, "link")); err != nil || target != "notes.txt" {
		t.Errorf("link: %q, %v", target, err)
	}
	if _, err := os.Stat(filepath.Join(out, "bands.tif")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("bands.tif of the earlier run is still there: %v", err)
	}
	if _, err := os.Stat(filepath.Join(out, "index.tif")); err != nil {
		t.Error(err)
	}
	if left := parentLeftovers(t, out); len(left) > 0 {
		t.Errorf("left behind %v", left)
	}
}

// TestPublishFailureLeavesEverything: bad input, and a file in the output
// directory that cannot be hard-linked (a named pipe), both stop the run with
// every earlier file byte-identical and no temporary directory behind.
func TestPublishFailureLeavesEverything(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "layers")
	if err := publishFiles(out, all, nil); err != nil {
		t.Fatal(err)
	}
	before := hashDir(t, out)
	if err := publishFiles(out, []string{"index.tif"}, errors.New("bad input")); err == nil {
		t.Fatal("a failed write published")
	}
	if err := syscall.Mkfifo(filepath.Join(out, "pipe"), 0o644); err != nil {
		t.Skipf("mkfifo: %v", err)
	}
	if err := publishFiles(out, all, nil); err == nil {
		t.Fatal("published with a pipe in the output")
	}
	if st, err := os.Lstat(filepath.Join(out, "pipe")); err != nil || st.Mode()&os.ModeNamedPipe == 0 {
		t.Fatalf("pipe gone: %v", err)
	}
	os.Remove(filepath.Join(out, "pipe")) // reading it would block
	after := hashDir(t, out)
	for name, h := range before {
		if after[name] != h {
			t.Errorf("%s changed", name)
		}
	}
	if len(after) != len(before) {
		t.Errorf("files before %d after %d", len(before), len(after))
	}
	if left := parentLeftovers(t, out); len(left) > 0 {
		t.Errorf("left behind %v", left)
	}
}

// TestPublishRecoversCrash: a crash between the two renames leaves no output
// directory and the previous one aside; the next run puts it back first, so
// the user's files in it survive. Stale temporary directories (dead pid, or
// older than an hour) are removed; a live run's recent one is kept.
func TestPublishRecoversCrash(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "layers")
	if err := publishFiles(out, all, nil); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(out, "notes.txt"), []byte("keep"), 0o644)
	// A pid above the Linux maximum (4194304) belongs to no process.
	const deadPid = "99999999"
	aside := filepath.Join(dir, ".layers.drygrid-old-"+deadPid+"-aaaa")
	if err := os.Rename(out, aside); err != nil {
		t.Fatal(err)
	}
	staleTmp := filepath.Join(dir, ".layers.drygrid-tmp-"+deadPid+"-bbbb")
	oldTmp := filepath.Join(dir, ".layers.drygrid-tmp-1-cccc") // pid 1 lives, but the dir is old
	liveTmp := filepath.Join(dir, ".layers.drygrid-tmp-1-dddd")
	for _, d := range []string{staleTmp, oldTmp, liveTmp} {
		os.MkdirAll(d, 0o755)
		os.WriteFile(filepath.Join(d, "index.tif"), []byte("partial"), 0o644)
	}
	long := time.Now().Add(-2 * time.Hour)
	os.Chtimes(oldTmp, long, long)
	if err := publishFiles(out, all, nil); err != nil {
		t.Fatal(err)
	}
	if b, err := os.ReadFile(filepath.Join(out, "notes.txt")); err != nil || string(b) != "keep" {
		t.Errorf("notes.txt after recovery: %q, %v", b, err)
	}
	left := parentLeftovers(t, out)
	if len(left) != 1 || left[0] != filepath.Base(liveTmp) {
		t.Errorf("left %v, want only the live run's %s", left, filepath.Base(liveTmp))
	}
}

// TestPublishRefuses: an output path that is a file, or that holds the
// working directory, is an error before anything is written.
func TestPublishRefuses(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "file")
	os.WriteFile(file, []byte("x"), 0o644)
	if err := publishFiles(file, all, nil); err == nil {
		t.Errorf("out is a file: no error")
	}
	if b, _ := os.ReadFile(file); string(b) != "x" {
		t.Errorf("file changed")
	}
	wd, _ := os.Getwd()
	sub := filepath.Join(dir, "work", "here")
	os.MkdirAll(sub, 0o755)
	if err := os.Chdir(sub); err != nil {
		t.Fatal(err)
	}
	defer os.Chdir(wd)
	if err := publishFiles(filepath.Join(dir, "work"), all, nil); err == nil {
		t.Errorf("out holds the working directory: no error")
	}
	if _, err := os.Stat(sub); err != nil {
		t.Errorf("working directory gone: %v", err)
	}
}

// TestPublishThroughSymlink: an output path that is a symbolic link to a
// directory replaces the directory and keeps the link.
func TestPublishThroughSymlink(t *testing.T) {
	dir := t.TempDir()
	real := filepath.Join(dir, "real")
	os.MkdirAll(real, 0o755)
	link := filepath.Join(dir, "current")
	if err := os.Symlink(real, link); err != nil {
		t.Skip(err)
	}
	if err := publishFiles(link, []string{"index.tif"}, nil); err != nil {
		t.Fatal(err)
	}
	if st, err := os.Lstat(link); err != nil || st.Mode()&os.ModeSymlink == 0 {
		t.Errorf("link replaced: %v", err)
	}
	if _, err := os.Stat(filepath.Join(real, "index.tif")); err != nil {
		t.Error(err)
	}
}

// TestPublishLock: while another process holds the lock beside OUT (here
// this test, through flock, as a second drygrid would), a run stops with
// an error naming the lock, and OUT untouched; once the lock
// is released the same run publishes.
func TestPublishLock(t *testing.T) {
	out := filepath.Join(t.TempDir(), "layers")
	if err := publishFiles(out, []string{"index.tif"}, nil); err != nil {
		t.Fatal(err)
	}
	before, err := os.ReadFile(filepath.Join(out, "outputs"))
	if err != nil {
		t.Fatal(err)
	}
	lock := filepath.Join(filepath.Dir(out), ".layers"+LockTag)
	f, err := os.OpenFile(lock, os.O_RDWR|os.O_CREATE, 0o644)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	// flock locks belong to the open file, so this second descriptor
	// conflicts with the run's own as another process's would.
	if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
		t.Fatal(err)
	}
	err = publishFiles(out, []string{"index.tif", "bands.tif"}, nil)
	if err == nil || !strings.Contains(err.Error(), "another drygrid run is writing "+out) || !strings.Contains(err.Error(), lock) {
		t.Errorf("locked run: %v", err)
	}
	if after, _ := os.ReadFile(filepath.Join(out, "outputs")); string(after) != string(before) {
		t.Error("the locked run changed the outputs list")
	}
	if _, err := os.Stat(filepath.Join(out, "bands.tif")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the locked run wrote bands.tif: %v", err)
	}
	syscall.Flock(int(f.Fd()), syscall.LOCK_UN)
	if err := publishFiles(out, []string{"index.tif", "bands.tif"}, nil); err != nil {
		t.Fatalf("run after the lock is released: %v", err)
	}
	if _, err := os.Stat(filepath.Join(out, "bands.tif")); err != nil {
		t.Error(err)
	}
	if left := parentLeftovers(t, out); len(left) > 0 {
		t.Errorf("left behind %v", left)
	}
}

// TestStageAbort: a stage aborted leaves the output directory as it was,
// nothing beside it (not even the lock file), and the lock free for the next run;
// a stage ends once.
func TestStageAbort(t *testing.T) {
	out := filepath.Join(t.TempDir(), "layers")
	if err := publishFiles(out, all, nil); err != nil {
		t.Fatal(err)
	}
	before := hashDir(t, out)
	s, err := Begin(out, Options{Owned: layerNames})
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(s.Dir(), "index.tif"), []byte("new"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Begin(out, Options{}); err == nil {
		t.Error("a second stage began while the first holds the lock")
	}
	s.Abort()
	s.Abort()
	if err := s.Commit(); err == nil {
		t.Error("Commit after Abort succeeded")
	}
	after := hashDir(t, out)
	if len(after) != len(before) || after["index.tif"] != before["index.tif"] {
		t.Errorf("aborted stage changed the output: %v -> %v", before, after)
	}
	if left := parentLeftovers(t, out); len(left) > 0 {
		t.Errorf("left behind %v", left)
	}
	if err := publishFiles(out, []string{"index.tif"}, nil); err != nil {
		t.Errorf("after Abort: %v", err)
	}
}

// TestPublishKeepsOwnerAndModes: the output directory's group, its setgid
// bit and a carried subdirectory's sticky bit and group survive a run
// (issue 17: they were lost). The group is set by chown, which only root
// may do for any group: elsewhere that part is skipped.
func TestPublishKeepsOwnerAndModes(t *testing.T) {
	out := filepath.Join(t.TempDir(), "layers")
	if err := publishFiles(out, all, nil); err != nil {
		t.Fatal(err)
	}
	shared := filepath.Join(out, "shared")
	if err := os.Mkdir(shared, 0o755); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(shared, "a.txt"), []byte("a"), 0o644)
	const gid = 1 // a group other than root's (daemon on Debian)
	chowned := os.Getuid() == 0
	if chowned {
		if err := os.Chown(out, -1, gid); err != nil {
			t.Fatal(err)
		}
		if err := os.Chown(shared, -1, gid); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.Chmod(out, 0o775|os.ModeSetgid); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod(shared, 0o777|os.ModeSticky); err != nil {
		t.Fatal(err)
	}
	if err := publishFiles(out, all, nil); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		path string
		mode os.FileMode
	}{{out, 0o775 | os.ModeSetgid}, {shared, 0o777 | os.ModeSticky}} {
		st, err := os.Stat(c.path)
		if err != nil {
			t.Fatal(err)
		}
		if got := st.Mode() & (os.ModePerm | os.ModeSetgid | os.ModeSticky | os.ModeSetuid); got != c.mode {
			t.Errorf("%s: mode %v, want %v", c.path, got, c.mode)
		}
		if g := st.Sys().(*syscall.Stat_t).Gid; chowned && g != gid {
			t.Errorf("%s: group %d, want %d", c.path, g, gid)
		}
	}
	if b, err := os.ReadFile(filepath.Join(shared, "a.txt")); err != nil || string(b) != "a" {
		t.Errorf("shared/a.txt: %q, %v", b, err)
	}
	if !chowned {
		t.Skip("not root: the group part (chown to group 1) is not checked")
	}
}

// TestPublishRefusesReadOnly: a read-only output directory (its owner has
// no write bit; root could write it all the same) and an output directory
// whose parent is read-only are refused before anything is written, with
// nothing left beside them (issue 17: it was replaced anyway and left
// .OUT.drygrid-old-* behind).
func TestPublishRefusesReadOnly(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "layers")
	if err := publishFiles(out, all, nil); err != nil {
		t.Fatal(err)
	}
	before := hashDir(t, out)
	if err := os.Chmod(out, 0o555); err != nil {
		t.Fatal(err)
	}
	defer os.Chmod(out, 0o755)
	wrote := false
	err := Dir(out, Options{Owned: layerNames}, func(string) error { wrote = true; return nil })
	if err == nil || !strings.Contains(err.Error(), "is read-only (mode -r-xr-xr-x)") || !strings.Contains(err.Error(), "chmod u+w") {
		t.Errorf("read-only output directory: %v", err)
	}
	if wrote {
		t.Error("the work ran before the refusal")
	}
	if after := hashDir(t, out); len(after) != len(before) {
		t.Errorf("output changed: %v -> %v", before, after)
	}
	if left := parentLeftovers(t, out); len(left) > 0 {
		t.Errorf("left behind %v", left)
	}
	os.Chmod(out, 0o755)
	roParent := filepath.Join(dir, "ro")
	os.Mkdir(roParent, 0o555)
	defer os.Chmod(roParent, 0o755)
	err = Dir(filepath.Join(roParent, "layers"), Options{}, func(string) error { wrote = true; return nil })
	if err == nil || !strings.Contains(err.Error(), "the directory it is in") || wrote {
		t.Errorf("read-only parent: %v (work ran: %v)", err, wrote)
	}
	if entries, _ := os.ReadDir(roParent); len(entries) > 0 {
		t.Errorf("left in the read-only parent: %v", entries)
	}
}

// TestRemoveTreeReadOnly: the previous directory is removed even when a
// user's subdirectory in it has no write permission (for a user other than
// root the plain removal fails there).
func TestRemoveTreeReadOnly(t *testing.T) {
	d := filepath.Join(t.TempDir(), "old")
	os.MkdirAll(filepath.Join(d, "ro"), 0o755)
	os.WriteFile(filepath.Join(d, "ro", "f"), []byte("x"), 0o444)
	os.Chmod(filepath.Join(d, "ro"), 0o555)
	if err := removeTree(d); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Lstat(d); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("still there: %v", err)
	}
}

// TestPublishCrashBetweenRenames: a crash between the two renames (the
// fault point "aside") leaves no output directory; the next Begin puts the
// previous one back before its work even starts, and the work failing
// then leaves it in place.
func TestPublishCrashBetweenRenames(t *testing.T) {
	out := filepath.Join(t.TempDir(), "layers")
	if err := publishFiles(out, all, nil); err != nil {
		t.Fatal(err)
	}
	before := hashDir(t, out)
	crash := errors.New("crash")
	Fault = func(string) error { return crash }
	err := publishFiles(out, []string{"index.tif"}, nil)
	Fault = nil
	if !errors.Is(err, crash) {
		t.Fatalf("fault: %v", err)
	}
	if _, err := os.Stat(out); !errors.Is(err, os.ErrNotExist) {
		t.Fatalf("output directory after the crash: %v", err)
	}
	s, err := Begin(out, Options{Owned: layerNames})
	if err != nil {
		t.Fatal(err)
	}
	if after := hashDir(t, out); len(after) != len(before) {
		t.Errorf("not restored by Begin: %v", after)
	}
	s.Abort()
	if left := parentLeftovers(t, out); len(left) > 0 {
		t.Errorf("left behind %v", left)
	}
	// The two renames to the end (a Fault that lets them go on), as where
	// the kernel has no exchange: published, nothing left beside.
	Fault = func(string) error { return nil }
	err = publishFiles(out, []string{"index.tif"}, nil)
	Fault = nil
	if err != nil {
		t.Fatal(err)
	}
	if b, err := os.ReadFile(filepath.Join(out, "outputs")); err != nil || string(b) != "index.tif" {
		t.Errorf("after the two renames: %q, %v", b, err)
	}
	if left := parentLeftovers(t, out); len(left) > 0 {
		t.Errorf("left behind %v", left)
	}
}

// TestLockWaitsAndLeavesNothing: holders of Lock with wait take turns
// (never two at once), and the lock file is gone when the last releases;
// without wait a held lock is an error naming the holder's pid.
func TestLockWaitsAndLeavesNothing(t *testing.T) {
	path := filepath.Join(t.TempDir(), ".h.csv"+LockTag)
	release, err := Lock(path, true)
	if err != nil {
		t.Fatal(err)
	}
	_, err = Lock(path, false)
	var busy *BusyError
	if !errors.As(err, &busy) || busy.Pid != os.Getpid() || !errors.Is(err, ErrBusy) {
		t.Errorf("second lock without wait: %v", err)
	}
	release()
	var inside, most int32
	done := make(chan error)
	for range 8 {
		go func() {
			rel, err := Lock(path, true)
			if err != nil {
				done <- err
				return
			}
			n := atomicAdd(&inside, 1)
			if n > most {
				most = n
			}
			time.Sleep(time.Millisecond)
			atomicAdd(&inside, -1)
			rel()
			done <- nil
		}()
	}
	for range 8 {
		if err := <-done; err != nil {
			t.Fatal(err)
		}
	}
	if most != 1 {
		t.Errorf("%d holders at once", most)
	}
	if _, err := os.Lstat(path); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("lock file left: %v", err)
	}
}

func atomicAdd(p *int32, d int32) int32 { return atomic.AddInt32(p, d) }
