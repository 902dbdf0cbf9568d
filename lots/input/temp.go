package input

import (
	"os"
	"sync"
)

var temps struct {
	sync.Mutex
	paths map[string]bool
}

// TempDir makes a private temporary folder for one read (under $TMPDIR)
// and registers it, so that RemoveTemps removes it if the command is
// interrupted. The caller removes it when done with done().
func TempDir(pattern string) (dir string, done func(), err error) {
	dir, err = os.MkdirTemp("", pattern)
	if err != nil {
		return "", func() {}, err
	}
	temps.Lock()
	if temps.paths == nil {
		temps.paths = map[string]bool{}
	}
	temps.paths[dir] = true
	temps.Unlock()
	return dir, func() {
		temps.Lock()
		delete(temps.paths, dir)
		temps.Unlock()
		os.RemoveAll(dir)
	}, nil
}

// RemoveTemps removes every registered temporary folder (for a signal
// handler: the command is about to exit).
func RemoveTemps() {
	temps.Lock()
	defer temps.Unlock()
	for p := range temps.paths {
		os.RemoveAll(p)
		delete(temps.paths, p)
	}
}
