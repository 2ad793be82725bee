// Package atomicfile writes the files forkcast makes (pictures, charts,
// tables) so that nobody ever sees half of one: the content goes to a new
// temporary file in the destination's own folder, is flushed to disk, and
// is then renamed over the destination in one step. A reader, or another
// writer racing for the same path, sees the old file or one whole new
// file, never a mixture.
//
// A symbolic link at the destination is refused (ErrSymlink), not
// followed: following it would write wherever the link points (a link
// planted in a shared folder could aim a write at any file of the user),
// and silently replacing it would break a link the user made on purpose.
// If a link appears between the check and the rename, the rename replaces
// the link itself; it never writes through it.
//
// A destination that is a character device or a named pipe (/dev/null, a
// FIFO a program reads from) has no content to replace: it is written in
// place. Any other kind of file that is not a regular file (a directory,
// a socket, a block device) is refused.
package atomicfile

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
)

// ErrSymlink is the error (wrapped, with the path) for a destination that
// is a symbolic link.
var ErrSymlink = errors.New("is a symbolic link; forkcast does not write through links (remove the link, or name the file it points to)")

// ErrNotRegular is the error (wrapped, with the path) for a destination
// that exists and is a directory, a socket or a block device.
var ErrNotRegular = errors.New("is not a regular file")

// Write replaces the file at path with data. A new file gets the
// permissions perm (less the process's umask); a file that exists keeps
// its own permission bits. On error the destination is as it was and no
// temporary file is left behind.
func Write(path string, data []byte, perm fs.FileMode) error {
	return WriteFunc(path, perm, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// WriteFunc is Write for content made by fill, which writes it to w (for
// output too big to hold in memory). If fill returns an error, nothing is
// replaced and the error is returned.
func WriteFunc(path string, perm fs.FileMode, fill func(w io.Writer) error) error {
	st, err := os.Lstat(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		st = nil
	case err != nil:
		return err
	case st.Mode()&fs.ModeSymlink != 0:
		return &fs.PathError{Op: "write", Path: path, Err: ErrSymlink}
	case st.Mode()&(fs.ModeCharDevice|fs.ModeNamedPipe) != 0:
		return writeInPlace(path, st, fill)
	case !st.Mode().IsRegular():
		kind := "not a regular file"
		if st.IsDir() {
			kind = "a directory"
		}
		return &fs.PathError{Op: "write", Path: path, Err: fmt.Errorf("%w: it is %s", ErrNotRegular, kind)}
	}
	tmp, err := createTemp(path, perm)
	if err != nil {
		return err
	}
	name := tmp.Name()
	fail := func(err error) error {
		_ = tmp.Close()
		_ = os.Remove(name)
		return err
	}
	if st != nil {
		// Keep the permissions of the file replaced: a private file
		// stays private.
		if err := tmp.Chmod(st.Mode().Perm()); err != nil {
			return fail(err)
		}
	}
	if err := fill(tmp); err != nil {
		return fail(err)
	}
	// Flush before the rename, so that after a crash the name holds the
	// old content or the whole new one, not an empty file.
	if err := tmp.Sync(); err != nil {
		return fail(err)
	}
	if err := tmp.Close(); err != nil {
		_ = os.Remove(name)
		return err
	}
	if err := os.Rename(name, path); err != nil {
		_ = os.Remove(name)
		return err
	}
	return nil
}

// createTemp makes a new, empty file beside path, with a name of its own
// (hidden, and marked as temporary, in case a crash leaves it behind).
// It is created with perm, so the umask applies as it does to any new
// file.
func createTemp(path string, perm fs.FileMode) (*os.File, error) {
	dir, base := filepath.Split(path)
	for range 10 {
		var r [6]byte
		if _, err := rand.Read(r[:]); err != nil {
			return nil, err
		}
		name := filepath.Join(dir, "."+base+".tmp-"+hex.EncodeToString(r[:]))
		f, err := os.OpenFile(name, os.O_WRONLY|os.O_CREATE|os.O_EXCL, perm)
		if errors.Is(err, fs.ErrExist) {
			continue
		}
		if err != nil {
			return nil, fmt.Errorf("making a temporary file beside %s: %w", path, err)
		}
		return f, nil
	}
	return nil, fmt.Errorf("making a temporary file beside %s: every name tried was taken", path)
}

// writeInPlace writes to a device or named pipe that exists at path. The
// file opened must be the one checked: a link swapped in meanwhile is
// refused before anything is written.
func writeInPlace(path string, st fs.FileInfo, fill func(w io.Writer) error) error {
	f, err := os.OpenFile(path, os.O_WRONLY, 0)
	if err != nil {
		return err
	}
	if now, err := f.Stat(); err != nil || !os.SameFile(st, now) {
		_ = f.Close()
		return &fs.PathError{Op: "write", Path: path, Err: errors.New("changed while it was being opened")}
	}
	if err := fill(f); err != nil {
		_ = f.Close()
		return err
	}
	return f.Close()
}
