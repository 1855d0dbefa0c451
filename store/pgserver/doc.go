// Package pgserver runs trussfleet's private PostgreSQL server from the machine's own
// server binaries, so that nobody has to set up a database to try trussfleet.
//
// A Server owns one data directory. Start creates it with initdb on first use, then starts
// the server with pg_ctl; later runs find it running, or start it again, and reuse its data.
// The server listens on a Unix socket only (a TCP port on localhost only when asked), in a
// directory only the server's own account can enter, and lets in one operating-system user:
// the one running trussfleet. At every start trussfleet writes the server's authentication
// files (auth.go): peer authentication on the socket, whose map admits only this process's
// effective user, as the role trussfleet, so that even the server's own account ("postgres"
// or "nobody" when trussfleet runs as root) is refused; and on TCP, scram-sha-256 with a
// random password in a file only that user can read (PasswordFile, named by TCPURL). A
// cluster made by an older trussfleet, whose pg_hba.conf trusted every local connection,
// gets the same protection at its next start; initdb now writes a pg_hba.conf that refuses
// everybody, in force only if the server is started without trussfleet's settings.
//
// Things that bite, and what this package does about them:
//
//   - initdb and postgres refuse to run as root. When the caller is root the server runs as
//     the system user "postgres" where it exists, else "nobody", and the data directory is
//     given to that user. Every parent of the data directory must then be searchable by that
//     user; where one is not (a home directory such as /root is 0700), Start adds search
//     permission for others (o+x, not read) to that directory and says so through
//     Options.Logf. Point Options.DataDir elsewhere to avoid it.
//   - A Unix socket path must fit in about 100 bytes. When the data directory's path is too
//     long, the socket goes to /tmp/trussfleet-<uid>-<hash of the data directory>, created
//     0700 for the server's account and checked to be ours before use.
//   - Two trussfleet processes may start at once: Start holds an exclusive lock on a file
//     beside the data directory (<data dir>.lock) while it initialises and starts.
//   - A crash leaves postmaster.pid (and the socket's lock file) behind, and after a restart
//     their process id may belong to an unrelated process. Start removes such a file when the
//     process it names is not a postgres serving this data directory.
//
// RunChild runs the server in the foreground as a child process instead, killed by the
// kernel if the parent dies: test harnesses use it so that no server outlives a test binary.
//
// The package reads no environment: the caller passes the search path for the binaries.
package pgserver
