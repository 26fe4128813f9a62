package batch

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// The names of the files an atomic write keeps beside its target NAME, in
// the same directory:
//
//	.NAME.ergostock-lock       the lock, held while a run writes NAME
//	.NAME.ergostock-tmp-PID    the file being written by process PID
//
// A temporary file is renamed over NAME when the write succeeds and removed
// when it fails or the run is interrupted (SIGINT, SIGTERM: see the
// command). A run that was killed outright (SIGKILL, out of memory) cannot
// clean up; the next run that takes the lock of the same NAME removes every
// .NAME.ergostock-tmp-* file it finds, since no other run can be writing
// one while it holds the lock.
const (
	lockSuffix = ".ergostock-lock"
	tmpInfix   = ".ergostock-tmp-"
)

// lockName and tmpPrefix give the lock file and the temporary file prefix
// of path.
func lockName(path string) string {
	return filepath.Join(filepath.Dir(path), "."+filepath.Base(path)+lockSuffix)
}

func tmpPrefix(path string) string {
	return filepath.Join(filepath.Dir(path), "."+filepath.Base(path)+tmpInfix)
}

// BusyError is the error of CreateAtomic when another run holds the lock
// of the same file.
type BusyError struct {
	Path string // the target file
	Lock string // the lock file
	PID  int    // the process holding it, 0 if unknown
}

func (e *BusyError) Error() string {
	who := "another ergostock run"
	if e.PID > 0 {
		who += fmt.Sprintf(" (pid %d)", e.PID)
	}
	return fmt.Sprintf("%s is writing it (lock %s); wait for it to finish or choose another file", who, e.Lock)
}

// AtomicFile is a file written under a temporary name and renamed over its
// target by Commit, so that readers see the old file or the whole new one,
// never a part. While it is open it holds the target's lock, so that two
// runs writing the same target cannot both succeed with one result lost.
type AtomicFile struct {
	path, tmp string
	mode      os.FileMode
	f         *os.File
	bw        *bufio.Writer
	lock      *fileLock
	done      bool
}

// CreateAtomic checks that path can be written (its directory exists and
// is writable, path is not a directory or another non-regular file), takes
// its lock, removes stale temporary files of earlier runs that were killed,
// and opens the temporary file. A new file gets mode 0644 at Commit; a
// replaced file keeps its mode. Call Commit or Abort exactly once.
func CreateAtomic(path string) (*AtomicFile, error) {
	dir := filepath.Dir(path)
	mode := os.FileMode(0o644)
	if fi, err := os.Stat(path); err == nil {
		if fi.IsDir() {
			return nil, fmt.Errorf("%s is a directory: want a file name", path)
		}
		if !fi.Mode().IsRegular() {
			return nil, fmt.Errorf("%s: not a regular file", path)
		}
		mode = fi.Mode().Perm()
	}
	if fi, err := os.Stat(dir); err != nil {
		return nil, fmt.Errorf("cannot create a file in %s: %w", dir, unwrapPath(err))
	} else if !fi.IsDir() {
		return nil, fmt.Errorf("%s is not a directory", dir)
	}
	lk, err := acquireLock(lockName(path))
	if err != nil {
		var be *BusyError
		if errors.As(err, &be) {
			be.Path = path
			return nil, be
		}
		return nil, fmt.Errorf("cannot create a file in %s: %w", dir, unwrapPath(err))
	}
	sweepStale(path)
	tmp := tmpPrefix(path) + strconv.Itoa(os.Getpid())
	f, err := os.OpenFile(tmp, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o600)
	if err != nil {
		lk.release()
		return nil, fmt.Errorf("cannot create a file in %s: %w", dir, unwrapPath(err))
	}
	return &AtomicFile{path: path, tmp: tmp, mode: mode, f: f, bw: bufio.NewWriterSize(f, 1<<16), lock: lk}, nil
}

// sweepStale removes the temporary files of path left by runs that were
// killed. The caller holds path's lock.
func sweepStale(path string) {
	prefix := tmpPrefix(path)
	ents, err := os.ReadDir(filepath.Dir(path))
	if err != nil {
		return
	}
	base := filepath.Base(prefix)
	for _, e := range ents {
		name := e.Name()
		if !strings.HasPrefix(name, base) {
			continue
		}
		if _, err := strconv.Atoi(name[len(base):]); err != nil || !e.Type().IsRegular() {
			continue
		}
		os.Remove(filepath.Join(filepath.Dir(path), name))
	}
}

func unwrapPath(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// Write writes to the temporary file (buffered).
func (a *AtomicFile) Write(p []byte) (int, error) { return a.bw.Write(p) }

// Name returns the target path.
func (a *AtomicFile) Name() string { return a.path }

// Commit flushes, syncs and closes the temporary file and renames it over
// the target; on any failure it removes the temporary file and leaves the
// target as it was. It releases the lock.
func (a *AtomicFile) Commit() (err error) {
	if a.done {
		return errors.New("atomic file already closed")
	}
	a.done = true
	defer a.lock.release()
	defer func() {
		if err != nil {
			a.f.Close()
			os.Remove(a.tmp)
		}
	}()
	if err = a.bw.Flush(); err != nil {
		return err
	}
	if err = a.f.Chmod(a.mode); err != nil {
		return err
	}
	if err = a.f.Sync(); err != nil {
		return err
	}
	if err = a.f.Close(); err != nil {
		return err
	}
	return os.Rename(a.tmp, a.path)
}

// Abort removes the temporary file and releases the lock; the target is
// left as it was. Abort after Commit does nothing, so it may be deferred.
func (a *AtomicFile) Abort() {
	if a.done {
		return
	}
	a.done = true
	a.f.Close()
	os.Remove(a.tmp)
	a.lock.release()
}

// WriteFileAtomic writes a file by calling write on an AtomicFile: the
// target is replaced only when write and every step succeed, and two runs
// writing the same path at once cannot both succeed (see CreateAtomic).
func WriteFileAtomic(path string, write func(w io.Writer) error) error {
	a, err := CreateAtomic(path)
	if err != nil {
		return err
	}
	if err := write(a); err != nil {
		a.Abort()
		return err
	}
	return a.Commit()
}
