//go:build !unix

package batch

import (
	"errors"
	"io/fs"
	"os"
	"strconv"
	"strings"
)

// fileLock is a lock file created exclusively. Without flock(2) a lock
// left by a killed run cannot be told from a live one: it is reported
// with its pid, to be removed by hand.
type fileLock struct {
	path string
	f    *os.File
}

func acquireLock(path string) (*fileLock, error) {
	f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o644)
	if errors.Is(err, fs.ErrExist) {
		b, _ := os.ReadFile(path)
		pid, _ := strconv.Atoi(strings.TrimSpace(string(b)))
		return nil, &BusyError{Lock: path, PID: pid}
	}
	if err != nil {
		return nil, err
	}
	f.WriteString(strconv.Itoa(os.Getpid()) + "\n")
	return &fileLock{path: path, f: f}, nil
}

func (l *fileLock) release() {
	if l == nil || l.f == nil {
		return
	}
	l.f.Close()
	os.Remove(l.path)
	l.f = nil
}
