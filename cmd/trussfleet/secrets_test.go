package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// testPassword is the password the tests below put in database URLs; its pieces must
// appear nowhere trussfleet writes.
const testPassword = "Zq7Pw0rd"

// shows reports the pieces of testPassword that s holds.
func shows(s string) []string {
	var found []string
	for _, piece := range []string{testPassword, "Zq7", "Pw0rd"} {
		if strings.Contains(s, piece) {
			found = append(found, piece)
		}
	}
	return found
}

// withPassword gives the server of a test database's URL (postgres://trussfleet@/db?host=..)
// in one of libpq's forms, "URI" or "keyword/value", with testPassword. The embedded
// server authenticates by peer, so it never asks for the password and both connect.
func withPassword(t *testing.T, dbURL, form string) string {
	t.Helper()
	u, err := url.Parse(dbURL)
	if err != nil {
		t.Fatal(err)
	}
	if form == "URI" {
		u.User = url.UserPassword(u.User.Username(), testPassword)
		return u.String()
	}
	q := u.Query()
	// Spaces around "=" and a quoted value: the spelling pgx's own redaction misses.
	return fmt.Sprintf("host=%s port=%s dbname=%s user=%s password = '%s'",
		q.Get("host"), q.Get("port"), strings.TrimPrefix(u.Path, "/"), u.User.Username(), testPassword)
}

func TestRedactedConfig(t *testing.T) {
	cfg := Config{Database: DatabaseConfig{URL: "host=/tmp password = " + testPassword + " dbname=fleet", DataDir: "/srv/pg"}, Workers: 3, Output: "out"}
	got := cfg.Redacted()
	if got.Database.URL != "host=/tmp password = xxxxx dbname=fleet" {
		t.Errorf("redacted URL %q", got.Database.URL)
	}
	if !strings.Contains(cfg.Database.URL, testPassword) {
		t.Errorf("Redacted changed its receiver: %q", cfg.Database.URL)
	}
	got.Database.URL = cfg.Database.URL
	if fmt.Sprint(got) != fmt.Sprint(cfg) {
		t.Errorf("Redacted changed more than the URL:\n got %+v\nwant %+v", got, cfg)
	}
}

// TestStoredRunHasNoPassword screens a small fleet with a password in the database URL,
// given in the configuration file and then (another password) on the command line, and
// reads back what the runs stored and what the commands print.
func TestStoredRunHasNoPassword(t *testing.T) {
	for _, form := range []string{"URI", "keyword/value"} {
		t.Run(form, func(t *testing.T) {
			secretURL := withPassword(t, pgtest.URL(t), form)
			masked := store.RedactConnString(secretURL)
			ctx := context.Background()
			db, err := store.Open(ctx, store.Options{URL: secretURL})
			if err != nil {
				t.Fatal(err)
			}
			defer db.Close()
			seedDemoFleet(t, db, 4)
			cfgPath, _ := faultConfigChunks(t, secretURL, 50)

			var printed strings.Builder
			run := func(args ...string) string {
				t.Helper()
				out, stderr, err := runCmdErr(t, args...)
				var ee *exitError
				if err != nil && !(errors.As(err, &ee) && ee.code == exitBridgesFailed) {
					t.Fatalf("trussfleet %s: %v\n%s%s", strings.Join(args, " "), err, out, stderr)
				}
				printed.WriteString(out + stderr)
				return out
			}
			run("--config", cfgPath, "screen")
			// The flag overrides the file's URL with another password for the same server.
			run("--config", cfgPath, "--database-url", strings.Replace(secretURL, testPassword, testPassword+"b", 1), "screen")
			runs, err := db.Runs(ctx, 10)
			if err != nil {
				t.Fatal(err)
			}
			if len(runs) != 2 {
				t.Fatalf("%d runs stored, want 2", len(runs))
			}
			run("--config", cfgPath, "runs", "show", fmt.Sprint(runs[0].ID))
			run("--config", cfgPath, "db", "status")
			if out := run("--config", cfgPath, "db", "url"); strings.TrimSpace(out) != masked {
				t.Errorf("db url printed %q, want %q", out, masked)
			}
			if l := shows(printed.String()); len(l) > 0 {
				t.Errorf("the commands printed %v:\n%s", l, printed.String())
			}

			for _, r := range runs {
				if l := shows(string(r.Config)); len(l) > 0 {
					t.Errorf("run %d stores %v in its configuration: %s", r.ID, l, r.Config)
				}
				// The server stays on record, its password masked.
				var stored struct{ Database DatabaseConfig }
				if err := json.Unmarshal(r.Config, &stored); err != nil {
					t.Fatal(err)
				}
				if stored.Database.URL != masked {
					t.Errorf("run %d records the URL as %q, want %q", r.ID, stored.Database.URL, masked)
				}
			}
			// Another password for the same server and settings: the same configuration.
			if runs[0].ConfigHash != runs[1].ConfigHash {
				t.Errorf("config hashes %s and %s differ: the password changed the stored configuration", runs[0].ConfigHash, runs[1].ConfigHash)
			}
		})
	}
}

// TestNoPasswordInErrors runs the real command (this test binary as trussfleet) with
// database URLs that cannot be parsed or name no reachable server, each holding
// testPassword, given by flag, environment and configuration file: the command must fail,
// say why, and show no piece of the password on stdout or stderr.
func TestNoPasswordInErrors(t *testing.T) {
	pw := testPassword
	urls := []string{
		"host=/tmp password = " + pw + " dbname",                         // no "=" after dbname
		"host=/tmp password = '" + pw + " and more' port=abc",            // quoted, spaces around "="
		"host=/tmp password= " + pw + " port=abc",                        // space after "="
		`host=/tmp password=Zq7\ Pw0rd port=abc`,                         // escaped space
		"host=/tmp password='" + pw,                                      // unterminated quote
		"host=/tmp password " + pw + " dbname=x",                         // no "=" at all
		"host=/nonexistent-tf password = " + pw + " dbname=x user=ana",   // parses; no server
		"postgres://ana:" + pw + "@h:notaport/db",                        // bad port
		"postgres://ana:Zq7/Pw0rd@h/db?sslmode=bogus",                    // "/" in the password
		"postgres://ana@/db?host=/nonexistent-tf&password=" + pw,         // parses; no server
		"postgresql://ana:" + pw + "@/db?host=/nonexistent-tf&port=5432", // parses; no server
	}
	type route struct {
		name string
		run  func(t *testing.T, u string) *exec.Cmd
	}
	beTrussfleet := func(args ...string) *exec.Cmd {
		cmd := exec.Command(os.Args[0], append([]string{"--"}, args...)...)
		cmd.Env = append(os.Environ(), beMain+"=1")
		cmd.Dir = t.TempDir() // no ./trussfleet.yaml
		return cmd
	}
	routes := []route{
		{"flag", func(t *testing.T, u string) *exec.Cmd { return beTrussfleet("--database-url", u, "bridges", "list") }},
		{"environment", func(t *testing.T, u string) *exec.Cmd {
			cmd := beTrussfleet("bridges", "list")
			cmd.Env = append(cmd.Env, "TRUSSFLEET_DATABASE_URL="+u)
			return cmd
		}},
		{"config file", func(t *testing.T, u string) *exec.Cmd {
			p := filepath.Join(t.TempDir(), "c.yaml")
			if err := os.WriteFile(p, []byte(fmt.Sprintf("database:\n  url: %q\n", u)), 0o600); err != nil {
				t.Fatal(err)
			}
			return beTrussfleet("--config", p, "db", "migrate")
		}},
	}
	for _, u := range urls {
		for _, r := range routes {
			t.Run(r.name+" "+u, func(t *testing.T) {
				cmd := r.run(t, u)
				var stdout, stderr bytes.Buffer
				cmd.Stdout, cmd.Stderr = &stdout, &stderr
				err := cmd.Run()
				var ee *exec.ExitError
				if !errors.As(err, &ee) || ee.ExitCode() != 1 {
					t.Fatalf("exit: %v, want code 1; stderr:\n%s", err, stderr.String())
				}
				if !strings.HasPrefix(stderr.String(), "trussfleet: ") ||
					!(strings.Contains(stderr.String(), "cannot parse") || strings.Contains(stderr.String(), "connect")) {
					t.Errorf("stderr does not say what failed:\n%s", stderr.String())
				}
				if l := shows(stdout.String() + stderr.String()); len(l) > 0 {
					t.Errorf("output shows %v:\nstdout: %s\nstderr: %s", l, stdout.String(), stderr.String())
				}
			})
		}
	}
}
