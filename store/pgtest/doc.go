// Package pgtest gives tests a real PostgreSQL database of their own: no mocks of the store.
//
// A package's tests call Main from TestMain, and DB (or URL) in each test that needs a
// database:
//
//	func TestMain(m *testing.M) { pgtest.Main(m) }
//
//	func TestSomething(t *testing.T) {
//		db := pgtest.DB(t) // a fresh, migrated database, dropped when the test ends
//		...
//	}
//
// The first DB call of a test binary starts one throwaway server (store/pgserver, in the
// foreground, in a new directory /tmp/tfpg-<pid>-*) or, when TRUSSFLEET_TEST_DATABASE_URL is set,
// uses that server instead; it then migrates a template database once, and every test gets
// a copy (CREATE DATABASE ... TEMPLATE, a file copy: fast). Main stops the server and
// removes its directory when the tests end; were the test binary killed, the kernel stops
// the server with it, and the next test binary to start a server removes its directory.
// Test binaries run in parallel by go test each have their own server,
// directory and socket.
//
// When no server can be had, a test is skipped, unless CI=true: then it fails, so that CI
// never passes by skipping. This package reads those two environment variables, and PATH to
// find the server binaries: it is test support, not program code.
package pgtest
