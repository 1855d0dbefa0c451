package pgserver

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"syscall"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
)

// Child is a server running in the foreground as a child of this process.
type Child struct {
	s    *Server
	cmd  *exec.Cmd
	done chan error // receives the exit status once
	err  error
	exit bool
}

// RunChild initialises the data directory if needed and runs postgres on it as a child
// process that the kernel kills (SIGQUIT, immediate shutdown) when this process dies, so a
// crashed or killed test binary leaves no server behind. It returns once the server
// accepts connections and the trussfleet database exists.
func (s *Server) RunChild(ctx context.Context) (*Child, error) {
	unlock, err := s.lock()
	if err != nil {
		return nil, err
	}
	defer unlock()
	if pid := s.runningPID(); pid > 0 {
		return nil, fmt.Errorf("a server (pid %d) already runs on %s", pid, s.dataDir)
	}
	if err := s.prepare(ctx); err != nil {
		return nil, err
	}
	logPath := filepath.Join(filepath.Dir(s.dataDir), filepath.Base(s.dataDir)+".log")
	logFile, err := os.OpenFile(logPath, os.O_CREATE|os.O_WRONLY|os.O_APPEND, 0o600)
	if err != nil {
		return nil, fmt.Errorf("opening server log %s: %w", logPath, err)
	}
	defer logFile.Close() // the child keeps its own descriptor
	// Not CommandContext: the server must outlive the start-up context.
	cmd := s.acct.command(context.Background(), s.tool("postgres"), "-D", s.dataDir)
	cmd.Stdout, cmd.Stderr = logFile, logFile
	if cmd.SysProcAttr == nil {
		cmd.SysProcAttr = &syscall.SysProcAttr{}
	}
	cmd.SysProcAttr.Pdeathsig = syscall.SIGQUIT
	// Its own process group: a Ctrl-C at the terminal reaches the test binary, whose
	// clean-up stops the server in order, not the server directly.
	cmd.SysProcAttr.Setpgid = true

	c := &Child{s: s, cmd: cmd, done: make(chan error, 1)}
	started := make(chan error, 1)
	go func() {
		// The kernel sends Pdeathsig when the thread that forked the child ends, not the
		// process: keep this goroutine, and so its thread, alive for the child's lifetime.
		runtime.LockOSThread()
		if err := cmd.Start(); err != nil {
			started <- err
			return
		}
		started <- nil
		c.done <- cmd.Wait()
	}()
	if err := <-started; err != nil {
		return nil, fmt.Errorf("starting postgres on %s: %w", s.dataDir, err)
	}
	if err := c.waitReady(ctx, logPath); err != nil {
		c.Stop()
		return nil, err
	}
	if err := s.setUp(ctx); err != nil {
		c.Stop()
		return nil, err
	}
	return c, nil
}

// waitReady polls until the server accepts a connection, it exits, or time runs out.
func (c *Child) waitReady(ctx context.Context, logPath string) error {
	ctx, cancel := context.WithTimeout(ctx, startTimeout)
	defer cancel()
	for {
		conn, err := pgx.Connect(ctx, c.s.URL("postgres"))
		if err == nil {
			conn.Close(ctx)
			return nil
		}
		// A server answering with an error other than "starting up" will not get better.
		var pgErr *pgconn.PgError
		if errors.As(err, &pgErr) && pgErr.Code != "57P03" {
			return fmt.Errorf("postgres on %s refuses connections: %w", c.s.dataDir, err)
		}
		select {
		case werr := <-c.done:
			c.exit, c.err = true, werr
			return fmt.Errorf("postgres on %s exited during start-up (%v)%s", c.s.dataDir, werr, tailOf(logPath))
		case <-ctx.Done():
			return fmt.Errorf("postgres on %s did not accept connections within %v: %w%s", c.s.dataDir, startTimeout, err, tailOf(logPath))
		case <-time.After(50 * time.Millisecond):
		}
	}
}

// PID is the postmaster's process id.
func (c *Child) PID() int { return c.cmd.Process.Pid }

// Stop asks the server for a fast shutdown and waits for it; after 30 s it is killed.
// Calling Stop again returns the first result.
func (c *Child) Stop() error {
	if c.exit {
		return c.err
	}
	c.exit = true
	_ = c.cmd.Process.Signal(syscall.SIGINT)
	select {
	case err := <-c.done:
		c.err = exitOK(err)
	case <-time.After(30 * time.Second):
		_ = c.cmd.Process.Kill()
		<-c.done
		c.err = errors.New("postgres (pid " + strconv.Itoa(c.PID()) + ") did not stop within 30 s and was killed")
	}
	return c.err
}

// exitOK treats the server's exit after a shutdown request as success.
func exitOK(err error) error {
	var ee *exec.ExitError
	if errors.As(err, &ee) && ee.ExitCode() == 0 {
		return nil
	}
	return err
}
