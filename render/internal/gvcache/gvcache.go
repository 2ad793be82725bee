// Package gvcache moves go-graphviz's WebAssembly compilation cache into
// the user's own cache directory.
//
// go-graphviz (v0.2.10) compiles its 1.5 MB WebAssembly build of Graphviz
// in a package init function, before main runs, and caches the compiled
// code in $TMPDIR/go-graphviz. It offers no way to pass a runtime or a
// cache of our own. Compiling takes about 0.8 s; loading from the cache
// about 0.03 s. A shared temporary directory is the wrong place for that
// cache: the first user on a machine owns it, and every other user's
// process then panics at start-up (permission denied on the cache file),
// and compiled machine code read from a directory others can write is a
// risk (wazero: "the embedder must safeguard this directory").
//
// The only hook left is the temporary directory go-graphviz asks the
// operating system for. This package's init points it, for the moment
// go-graphviz initialises, at os.UserCacheDir()/forkcast (so the cache
// lands in …/forkcast/go-graphviz, private to the user), and Restore puts
// the original value back; package gv calls Restore from its own init,
// which runs after go-graphviz's because gv imports it. The Go
// specification (since Go 1.21) initialises packages in import-path
// order among those whose imports are ready, so this package
// ("github.com/forkcast/…") runs before
// "github.com/goccy/go-graphviz/internal/wasm" as long as it imports no
// more than that package does (os, path/filepath, runtime). TestCacheDir
// in package render checks the whole arrangement.
//
// When no user cache directory can be made, the cache is switched off (a
// slower start, never a crash).
package gvcache

import (
	"os"
	"path/filepath"
	"runtime"
)

// The state below is written once, by init, before main runs, and read
// by Restore and Dir; nothing changes it afterwards.
var (
	envName  = tempEnv()
	origVal  string
	origSet  bool
	cacheDir string // "" when caching is off
)

func tempEnv() string {
	if runtime.GOOS == "windows" {
		return "TMP" // GetTempPath looks at TMP first
	}
	return "TMPDIR"
}

func init() {
	origVal, origSet = os.LookupEnv(envName)
	dir := ""
	if base, err := os.UserCacheDir(); err == nil {
		d := filepath.Join(base, "forkcast")
		if err := os.MkdirAll(d, 0o700); err == nil {
			dir = d
		}
	}
	if dir == "" {
		// go-graphviz makes <tmp>/go-graphviz with os.Mkdir; under a
		// path that cannot be a directory that fails, and it then
		// compiles without a cache.
		_ = os.Setenv(envName, filepath.Join(os.DevNull, "forkcast-no-cache"))
		return
	}
	cacheDir = filepath.Join(dir, "go-graphviz")
	_ = os.Setenv(envName, dir)
}

// Restore puts the temporary-directory variable back as it was before
// init. It is called once go-graphviz has initialised; calling it again
// does no harm.
func Restore() {
	if origSet {
		_ = os.Setenv(envName, origVal)
	} else {
		_ = os.Unsetenv(envName)
	}
}

// Dir is the directory go-graphviz was pointed at for its compilation
// cache, or "" when caching is off.
func Dir() string { return cacheDir }
