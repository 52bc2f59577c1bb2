package main

import (
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"syscall"
	"testing"
	"time"
)

// buildCorefall builds the command into a temporary directory once per test binary.
func buildCorefall(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "corefall")
	cmd := exec.Command("go", "build", "-o", bin, ".")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

// TestSignalStopsRun sends a real SIGINT and SIGTERM to a running `corefall run`: it must exit within a
// second with the distinct exit code, leave no temporary file, and keep the previous catalogue.
func TestSignalStopsRun(t *testing.T) {
	if testing.Short() {
		t.Skip("-short: skips building the binary for the signal test")
	}
	bin := buildCorefall(t)
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
		dir := t.TempDir()
		out := filepath.Join(dir, "cat.parquet")
		if err := os.WriteFile(out, []byte("previous complete file"), 0o644); err != nil {
			t.Fatal(err)
		}
		cmd := exec.Command(bin, "run", "--quiet", "--set", "systems=200000000", "-o", out)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		// Wait until the run is writing (its temporary file exists), then signal.
		deadline := time.Now().Add(20 * time.Second)
		for {
			entries, _ := os.ReadDir(dir)
			if len(entries) > 1 || time.Now().After(deadline) {
				break
			}
			time.Sleep(20 * time.Millisecond)
		}
		sent := time.Now()
		if err := cmd.Process.Signal(sig); err != nil {
			t.Fatal(err)
		}
		err := cmd.Wait()
		took := time.Since(sent)
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.ExitCode() != exitInterrupted {
			t.Errorf("%v: exit %v, want code %d", sig, err, exitInterrupted)
		}
		if took > time.Second {
			t.Errorf("%v: took %v to stop, want under a second", sig, took)
		}
		entries, _ := os.ReadDir(dir)
		if len(entries) != 1 {
			names := []string{}
			for _, e := range entries {
				names = append(names, e.Name())
			}
			t.Errorf("%v: directory holds %v, want only the previous catalogue", sig, names)
		}
		if b, _ := os.ReadFile(out); string(b) != "previous complete file" {
			t.Errorf("%v: the previous catalogue was changed", sig)
		}
	}
}
