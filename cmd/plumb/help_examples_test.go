package main

import (
	"bytes"
	"context"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestHelpExamples runs every example line of every command's --help, as
// a user would after plumb demo: in a fresh folder holding the demo's
// plumb-demo/ and the repository's examples/, with this test binary
// standing in for plumb (see TestMain). Each line must succeed. plumb
// serve's example starts the server in the background (on a free port in
// place of the one the example names) for the lines after it.
func TestHelpExamples(t *testing.T) {
	self, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	bin := t.TempDir()
	if err := os.Symlink(self, filepath.Join(bin, "plumb")); err != nil {
		t.Fatal(err)
	}
	examples, err := filepath.Abs("../../examples")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := os.Symlink(examples, filepath.Join(dir, "examples")); err != nil {
		t.Fatal(err)
	}
	env := append(os.Environ(), "PATH="+bin+string(os.PathListSeparator)+os.Getenv("PATH"), "PLUMB_TEST_AS_PLUMB=1")
	shell := func(t *testing.T, line string) {
		t.Helper()
		cmd := exec.Command("bash", "-c", "set -eo pipefail; "+line)
		cmd.Dir, cmd.Env = dir, env
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Errorf("%s\nfailed (%v):\n%s", line, err, out)
		}
	}
	shell(t, "plumb demo > /dev/null")
	if t.Failed() {
		t.FailNow()
	}
	for _, c := range newRootCommand().Commands() {
		lines := exampleLines(c.Example)
		if len(lines) == 0 {
			continue
		}
		t.Run(c.Name(), func(t *testing.T) {
			for i := 0; i < len(lines); i++ {
				line := lines[i]
				if !strings.Contains(line, "plumb serve") {
					shell(t, line)
					continue
				}
				port := freePort(t)
				rest := lines[i+1:]
				for j := range rest {
					rest[j] = strings.ReplaceAll(rest[j], "port=5433", "port="+port)
				}
				if strings.Contains(strings.Join(rest, "\n"), "psql ") {
					if _, err := exec.LookPath("psql"); err != nil {
						missingTool(t, "psql", "apt-get install postgresql-client")
					}
				}
				stop := startInBackground(t, strings.ReplaceAll(line, ":5433", ":"+port), dir, env, port)
				for _, l := range rest {
					shell(t, l)
				}
				stop()
				return
			}
		})
	}
}

// exampleLines splits a command's Example into its command lines.
func exampleLines(example string) []string {
	var lines []string
	for _, l := range strings.Split(example, "\n") {
		if l = strings.TrimSpace(l); l != "" {
			lines = append(lines, l)
		}
	}
	return lines
}

// missingTool skips a test that needs a program absent here, saying how to
// get it, or fails it in CI, where .ci/run installs it.
func missingTool(t *testing.T, name, how string) {
	t.Helper()
	if os.Getenv("CI") == "true" {
		t.Fatalf("needs %s, which .ci/run installs (%s)", name, how)
	}
	t.Skipf("needs %s: %s (.ci/run does this)", name, how)
}

func freePort(t *testing.T) string {
	t.Helper()
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	_, port, _ := net.SplitHostPort(l.Addr().String())
	return port
}

// startInBackground starts a shell line that runs a server and waits until
// the port accepts connections; stop ends it.
func startInBackground(t *testing.T, line, dir string, env []string, port string) (stop func()) {
	t.Helper()
	cmd := exec.Command("bash", "-c", "exec env "+line)
	cmd.Dir, cmd.Env = dir, env
	var logs bytes.Buffer
	cmd.Stdout, cmd.Stderr = &logs, &logs
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	stop = func() {
		cmd.Process.Signal(os.Interrupt)
		select {
		case <-done:
		case <-time.After(30 * time.Second):
			cmd.Process.Kill()
			<-done
		}
	}
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	for {
		c, err := (&net.Dialer{}).DialContext(ctx, "tcp", "127.0.0.1:"+port)
		if err == nil {
			c.Close()
			return stop
		}
		select {
		case err := <-done:
			t.Fatalf("%s\nstopped before listening (%v):\n%s", line, err, logs.String())
		case <-ctx.Done():
			stop()
			t.Fatalf("%s\nnot listening after 60 s:\n%s", line, logs.String())
		case <-time.After(100 * time.Millisecond):
		}
	}
}
