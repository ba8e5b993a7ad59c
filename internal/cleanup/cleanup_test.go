package cleanup

import (
	"errors"
	"os"
	"path/filepath"
	"testing"
)

// Common practice, no source: an interrupt removes every registered
// temporary, spares what was forgotten, and refuses later requests.
func TestInterrupt(t *testing.T) {
	t.Cleanup(Reset)
	dir := t.TempDir()
	f, _, err := CreateTemp(dir, "a-*")
	if err != nil {
		t.Fatal(err)
	}
	d, _, err := MkdirTemp(dir, "d-*")
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(d, "inside"), []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	kept, forget, err := CreateTemp(dir, "k-*")
	if err != nil {
		t.Fatal(err)
	}
	kept.Close()
	forget()
	ran := false
	if _, err := Register(func() { ran = true }); err != nil {
		t.Fatal(err)
	}
	if n := Pending(); n != 3 {
		t.Fatalf("%d pending, want 3", n)
	}
	Interrupt()
	for _, p := range []string{f.Name(), d} {
		if _, err := os.Stat(p); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("%s survived the interrupt (%v)", p, err)
		}
	}
	if _, err := os.Stat(kept.Name()); err != nil {
		t.Errorf("a forgotten temporary was removed: %v", err)
	}
	if !ran {
		t.Error("a registered function did not run")
	}
	if _, _, err := CreateTemp(dir, "late-*"); !errors.Is(err, ErrInterrupted) {
		t.Errorf("CreateTemp after Interrupt: %v", err)
	}
	if err := Hold(func() error { t.Error("Hold ran after Interrupt"); return nil }); !errors.Is(err, ErrInterrupted) {
		t.Errorf("Hold after Interrupt: %v", err)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("left in the folder: %v", entries)
	}
}

// Common practice, no source: an interrupt waits for a step in Hold.
func TestHoldDefersInterrupt(t *testing.T) {
	t.Cleanup(Reset)
	inside, release := make(chan struct{}), make(chan struct{})
	done := make(chan struct{})
	var order []string
	go func() {
		Hold(func() error {
			close(inside)
			<-release
			order = append(order, "hold")
			return nil
		})
	}()
	<-inside
	go func() {
		Interrupt()
		order = append(order, "interrupt")
		close(done)
	}()
	close(release)
	<-done
	if len(order) != 2 || order[0] != "hold" {
		t.Errorf("order %v, want hold before interrupt", order)
	}
}
