package atomicfile

import (
	"bytes"
	"crypto/sha256"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

// noTemps fails the test if a temporary file was left in dir.
func noTemps(t *testing.T, dir string) {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if strings.Contains(e.Name(), ".tmp-") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
}

func TestWrite(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "out.svg")
	if err := Write(p, []byte("first"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := Write(p, []byte("second, longer"), 0o644); err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(p)
	if err != nil || string(got) != "second, longer" {
		t.Fatalf("read %q, %v", got, err)
	}
	// The file replaced was private; its replacement stays private.
	st, _ := os.Stat(p)
	if st.Mode().Perm() != 0o600 {
		t.Errorf("mode %v after replacing a 0600 file, want 0600", st.Mode().Perm())
	}
	noTemps(t, dir)
}

func TestRefusals(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "target.txt")
	if err := os.WriteFile(target, []byte("keep me"), 0o644); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.svg")
	if err := os.Symlink(target, link); err != nil {
		t.Skipf("no symbolic links here: %v", err)
	}
	sub := filepath.Join(dir, "sub")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("boom")
	for _, c := range []struct {
		name string
		path string
		fill func(io.Writer) error
		want error // errors.Is, or nil for any error
	}{
		{"symlink", link, nil, ErrSymlink},
		{"directory", sub, nil, ErrNotRegular},
		{"missing folder", filepath.Join(dir, "no", "such", "x.svg"), nil, fs.ErrNotExist},
		{"fill fails", target, func(w io.Writer) error { _, _ = w.Write([]byte("half")); return boom }, boom},
	} {
		t.Run(c.name, func(t *testing.T) {
			fill := c.fill
			if fill == nil {
				fill = func(w io.Writer) error { _, err := w.Write([]byte("new")); return err }
			}
			err := WriteFunc(c.path, 0o644, fill)
			if err == nil || !errors.Is(err, c.want) {
				t.Fatalf("err %v, want %v", err, c.want)
			}
		})
	}
	if got, _ := os.ReadFile(target); string(got) != "keep me" {
		t.Errorf("the link's target was changed to %q", got)
	}
	if st, err := os.Lstat(link); err != nil || st.Mode()&fs.ModeSymlink == 0 {
		t.Errorf("the link was not left as it was: %v", err)
	}
	noTemps(t, dir)
	noTemps(t, sub)
}

// TestConcurrentWriters has many writers replace one path at once while a
// reader keeps reading it: every read, and the file at the end, must be
// one writer's whole content (each content carries its own checksum).
func TestConcurrentWriters(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "same.svg")
	const writers, rounds = 8, 10
	content := func(w, r int) []byte {
		body := bytes.Repeat([]byte(fmt.Sprintf("<writer %d round %d/>", w, r)), 4000+w*97)
		sum := sha256.Sum256(body)
		return append(append([]byte(fmt.Sprintf("%x\n", sum)), body...), "\nend\n"...)
	}
	whole := func(b []byte) bool {
		head, body, ok := bytes.Cut(b, []byte("\n"))
		if !ok || !bytes.HasSuffix(body, []byte("\nend\n")) {
			return false
		}
		sum := sha256.Sum256(bytes.TrimSuffix(body, []byte("\nend\n")))
		return string(head) == fmt.Sprintf("%x", sum)
	}
	var wg sync.WaitGroup
	errs := make(chan error, writers*rounds+1)
	stop := make(chan struct{})
	reads := 0
	var readerDone sync.WaitGroup
	readerDone.Add(1)
	go func() {
		defer readerDone.Done()
		for {
			select {
			case <-stop:
				return
			default:
			}
			b, err := os.ReadFile(p)
			if errors.Is(err, fs.ErrNotExist) {
				continue
			}
			reads++
			if err != nil {
				errs <- err
				return
			}
			if !whole(b) {
				errs <- fmt.Errorf("a reader saw a partial file of %d bytes", len(b))
				return
			}
		}
	}()
	for w := range writers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for r := range rounds {
				if err := Write(p, content(w, r), 0o644); err != nil {
					errs <- err
					return
				}
			}
		}()
	}
	wg.Wait()
	close(stop)
	readerDone.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	b, err := os.ReadFile(p)
	if err != nil || !whole(b) {
		t.Fatalf("the file at the end is not one writer's whole content (%d bytes, %v)", len(b), err)
	}
	if reads == 0 {
		t.Error("the reader never saw the file")
	}
	noTemps(t, dir)
}
