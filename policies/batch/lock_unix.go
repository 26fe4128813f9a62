//go:build unix

package batch

import (
	"errors"
	"os"
	"strconv"
	"strings"
	"syscall"
)

// fileLock is an exclusive flock(2) on a lock file. The kernel drops the
// lock when its holder dies, however it dies, so a lock left by a killed
// run is free for the next one: there is no stale lock to judge.
type fileLock struct {
	path string
	f    *os.File
}

// acquireLock takes the lock at path without waiting; a held lock gives a
// *BusyError naming the holder's pid (which the holder writes into the
// file).
func acquireLock(path string) (*fileLock, error) {
	for attempt := 0; ; attempt++ {
		f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE, 0o644)
		if err != nil {
			return nil, err
		}
		if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
			b := make([]byte, 32)
			n, _ := f.ReadAt(b, 0)
			f.Close()
			if errors.Is(err, syscall.EWOULDBLOCK) {
				pid, _ := strconv.Atoi(strings.TrimSpace(string(b[:n])))
				return nil, &BusyError{Lock: path, PID: pid}
			}
			return nil, err
		}
		// The holder before us may have removed the file between our open
		// and our lock; then we locked an unlinked file and must retry
		// on the one now at path.
		fi, err1 := f.Stat()
		pi, err2 := os.Stat(path)
		if err1 != nil || err2 != nil || !os.SameFile(fi, pi) {
			f.Close()
			if attempt < 10 {
				continue
			}
			return nil, &BusyError{Lock: path}
		}
		f.Truncate(0)
		f.WriteAt([]byte(strconv.Itoa(os.Getpid())+"\n"), 0)
		return &fileLock{path: path, f: f}, nil
	}
}

// release removes the lock file and drops the lock (in that order, so
// that nobody locks the file we remove).
func (l *fileLock) release() {
	if l == nil || l.f == nil {
		return
	}
	os.Remove(l.path)
	l.f.Close()
	l.f = nil
}
