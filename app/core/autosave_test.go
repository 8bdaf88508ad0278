package core

import (
	"bufio"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestRecoverAfterCrash simulates a crash: the autosaver writes, nothing
// cleans up, and Recover finds the session; after a clean exit it finds
// nothing.
func TestRecoverAfterCrash(t *testing.T) {
	b := demoBench(t)
	dir := t.TempDir()
	if rec, err := Recover(dir); err != nil || rec != nil {
		t.Fatalf("empty directory: %v, %v", rec, err)
	}
	a, err := NewAutosaver(dir, 50*time.Millisecond)
	if err != nil {
		t.Fatal(err)
	}
	s := NewSession(b)
	s.Temperature = 4321
	s.KnockOut = "Nd"
	a.Changed(s)
	s.Temperature = 9999 // after Changed: the autosaver keeps its own copy
	if err := a.Flush(); err != nil {
		t.Fatal(err)
	}
	// "Crash": no Close.
	rec, err := Recover(dir)
	if err != nil || rec == nil {
		t.Fatalf("no recovery after a crash: %v", err)
	}
	if rec.Session.Temperature != 4321 || rec.Session.KnockOut != "Nd" || rec.Session.Dataset != DemoName {
		t.Errorf("recovered %+v", rec.Session)
	}
	if err := rec.Session.Validate(b.Data); err != nil {
		t.Errorf("recovered session invalid: %v", err)
	}
	// The recovery file is a session file OpenSession reads.
	if _, s2, err := OpenSession(t.Context(), rec.Path, nil); err != nil || s2.Temperature != 4321 {
		t.Errorf("OpenSession of the recovery file: %v", err)
	}
	// A clean exit removes it and marks the exit; Recover offers nothing.
	a2, err := NewAutosaver(dir, 0)
	if err != nil {
		t.Fatal(err)
	}
	if err := a2.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(rec.Path); !os.IsNotExist(err) {
		t.Errorf("recovery file still there after a clean exit: %v", err)
	}
	if rec, err := Recover(dir); err != nil || rec != nil {
		t.Errorf("after a clean exit: %v, %v", rec, err)
	}
	// A recovery file older than the last clean exit is not offered.
	if err := WriteFileAtomic(filepath.Join(dir, RecoveryFile), []byte(`{"version":1}`)); err != nil {
		t.Fatal(err)
	}
	old := time.Now().Add(-time.Hour)
	os.Chtimes(filepath.Join(dir, RecoveryFile), old, old)
	if rec, err := Recover(dir); err != nil || rec != nil {
		t.Errorf("stale recovery file offered: %v, %v", rec, err)
	}
	// A damaged recovery file newer than the exit is an error naming it.
	if err := WriteFileAtomic(filepath.Join(dir, RecoveryFile), []byte(`{"version":`)); err != nil {
		t.Fatal(err)
	}
	future := time.Now().Add(time.Minute)
	os.Chtimes(filepath.Join(dir, RecoveryFile), future, future)
	if _, err := Recover(dir); err == nil || !strings.Contains(err.Error(), RecoveryFile) {
		t.Errorf("damaged recovery file: %v", err)
	}
	if err := Discard(dir); err != nil {
		t.Fatal(err)
	}
	if rec, err := Recover(dir); err != nil || rec != nil {
		t.Errorf("after Discard: %v, %v", rec, err)
	}
}

// TestAutosaveThrottles checks that a burst of changes is written at most
// once per interval and that the newest change is the one written.
func TestAutosaveThrottles(t *testing.T) {
	b := demoBench(t)
	dir := t.TempDir()
	a, err := NewAutosaver(dir, time.Hour)
	if err != nil {
		t.Fatal(err)
	}
	s := NewSession(b)
	s.Temperature = 3000
	a.Changed(s) // first change: written at once
	waitFor(t, func() bool { r, _ := Recover(dir); return r != nil && r.Session.Temperature == 3000 })
	for i := 1; i <= 50; i++ {
		s.Temperature = 3000 + float64(i)
		a.Changed(s)
	}
	// The interval (an hour) has not passed: the file still holds the
	// first change.
	if r, _ := Recover(dir); r == nil || r.Session.Temperature != 3000 {
		t.Fatalf("the burst was written before the interval: %+v", r)
	}
	if err := a.Flush(); err != nil {
		t.Fatal(err)
	}
	if r, _ := Recover(dir); r == nil || r.Session.Temperature != 3050 {
		t.Fatalf("after Flush the file holds %+v, want the newest change (3050 K)", r)
	}
	if err := a.Close(); err != nil {
		t.Fatal(err)
	}
	a.Changed(s) // after Close: ignored
	if r, _ := Recover(dir); r != nil {
		t.Error("a change after Close was written")
	}
}

func waitFor(t *testing.T, cond func() bool) {
	t.Helper()
	deadline := time.Now().Add(30 * time.Second)
	for !cond() {
		if time.Now().After(deadline) {
			t.Fatal("condition not reached within 30 s")
		}
		time.Sleep(10 * time.Millisecond)
	}
}

// The child process of TestAutosaveSurvivesKill: it changes the session
// every 20 ms through an autosaver on the directory the environment names,
// printing each change's number, until it is killed.
const killChildEnv = "BROADLINE_AUTOSAVE_CHILD_DIR"

func TestMain(m *testing.M) {
	if dir := os.Getenv(killChildEnv); dir != "" {
		os.Exit(autosaveChild(dir))
	}
	os.Exit(m.Run())
}

func autosaveChild(dir string) int {
	b, err := Demo()
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		return 1
	}
	a, err := NewAutosaver(dir, 0)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		return 1
	}
	s := NewSession(b)
	for i := 1; ; i++ {
		// The change number is carried by the temperature.
		s.Temperature = MinTemperature + float64(i)
		a.Changed(s)
		fmt.Println(i)
		time.Sleep(20 * time.Millisecond)
	}
}

// TestAutosaveSurvivesKill runs the autosaver in a child process (this
// test binary again), kills it with SIGKILL after a few seconds of changes
// and recovers: the recovered session must be one the child made, no older
// than the default interval plus a second for writing (issue 11: kill -9
// loses at most the last few seconds).
func TestAutosaveSurvivesKill(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a child process for a few seconds")
	}
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	cmd := exec.Command(exe, "-test.run=^$")
	cmd.Env = append(os.Environ(), killChildEnv+"="+dir)
	out, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	cmd.Stderr = os.Stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	// When each change was reported, by number.
	seen := map[int]time.Time{}
	sc := bufio.NewScanner(out)
	var start time.Time
	for sc.Scan() {
		n, err := strconv.Atoi(sc.Text())
		if err != nil {
			t.Fatalf("child said %q", sc.Text())
		}
		now := time.Now()
		if n == 1 {
			start = now
		}
		seen[n] = now
		if now.Sub(start) > 5*time.Second {
			break
		}
	}
	if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	killed := time.Now()
	cmd.Wait()
	rec, err := Recover(dir)
	if err != nil || rec == nil {
		t.Fatalf("nothing recovered after kill -9: %v", err)
	}
	n := int(rec.Session.Temperature - MinTemperature)
	made, ok := seen[n]
	if !ok {
		// The child may have written a change it had not yet reported.
		if _, later := seen[n-1]; !later {
			t.Fatalf("recovered change %d, which the child never made", n)
		}
		made = killed
	}
	lost := killed.Sub(made)
	t.Logf("recovered change %d of %d; the changes of the last %v were lost", n, len(seen), lost.Round(time.Millisecond))
	if lost > DefaultAutosaveInterval+time.Second {
		t.Errorf("kill -9 lost %v of changes, want at most %v", lost, DefaultAutosaveInterval+time.Second)
	}
}
