package store

import (
	"errors"
	"net/url"
	"sort"
	"strings"

	"github.com/jackc/pgx/v5/pgconn"
)

// passwordMask stands in for a password in anything trussfleet prints or stores.
const passwordMask = "xxxxx"

// RedactConnString returns a PostgreSQL connection string with every password it holds
// replaced by xxxxx, in either of libpq's forms:
//
//   - URI: postgres://user:PW@host/db, and the password and sslpassword query parameters;
//   - keyword/value: password=PW, password = PW (libpq allows spaces around "="),
//     password='P W' (quoted, with \' and \\ escapes), and sslpassword likewise.
//
// It works on malformed strings too, the ones whose error messages most need it: where the
// boundaries are unclear it masks too much rather than too little (in a URI, everything
// from the first ":" of the user part to the last "@"). Everything else is kept, so that a
// message can still say which server was meant.
func RedactConnString(s string) string {
	spans := passwordSpans(s)
	if len(spans) == 0 {
		return s
	}
	var b strings.Builder
	last := 0
	for _, sp := range spans {
		b.WriteString(s[last:sp.start])
		b.WriteString(passwordMask)
		last = sp.end
	}
	b.WriteString(s[last:])
	return b.String()
}

// RedactError returns err with every password of connString removed from its message: the
// connection string pgx quotes when it cannot parse one is replaced by RedactConnString's
// (pgx masks only the forms it recognises; "password = PW" it prints whole), and any
// other occurrence of a password, raw or decoded, is masked. errors.Is and errors.As still
// reach err. A nil err stays nil.
func RedactError(err error, connString string) error {
	if err == nil {
		return nil
	}
	msg := err.Error()
	var pe *pgconn.ParseConfigError
	if errors.As(err, &pe) {
		const open = "cannot parse `"
		if i := strings.Index(msg, open); i >= 0 {
			// pgx's reason follows the quoted string; a reason never holds "`: ", a
			// malformed string might.
			if j := strings.LastIndex(msg, "`: "); j > i {
				msg = msg[:i+len(open)] + RedactConnString(pe.ConnString) + msg[j:]
			}
		}
	}
	return &redactedError{msg: scrub(msg, connString), err: err}
}

// redactedError carries a message cleaned of passwords and the original error beneath it.
type redactedError struct {
	msg string
	err error
}

func (e *redactedError) Error() string { return e.msg }
func (e *redactedError) Unwrap() error { return e.err }

// scrub masks, in msg, every password connString holds, in every spelling a parser or a
// message could give it: raw, unquoted and unescaped, percent-decoded, and each of its
// space-separated words of three or more characters (a parser that splits a password at a
// space prints its pieces).
func scrub(msg, connString string) string {
	var secrets []string
	for _, sp := range passwordSpans(connString) {
		raw := connString[sp.start:sp.end]
		for _, v := range []string{raw, unquote(raw), percentDecoded(raw)} {
			secrets = append(secrets, v)
			for _, w := range strings.Fields(strings.ReplaceAll(v, `\`, " ")) {
				if len(w) >= 3 {
					secrets = append(secrets, w)
				}
			}
		}
	}
	// Longest first, so that a password is masked whole before any of its pieces.
	sort.Slice(secrets, func(i, j int) bool { return len(secrets[i]) > len(secrets[j]) })
	for _, v := range secrets {
		if v != "" && v != passwordMask {
			msg = strings.ReplaceAll(msg, v, passwordMask)
		}
	}
	return msg
}

// span is a password's byte range [start, end) in a connection string.
type span struct{ start, end int }

// passwordSpans finds the passwords of a connection string, in order.
func passwordSpans(s string) []span {
	trimmed := strings.TrimLeft(s, " \t\n\r\f\v")
	lower := strings.ToLower(trimmed)
	for _, scheme := range []string{"postgres://", "postgresql://"} {
		if strings.HasPrefix(lower, scheme) {
			off := len(s) - len(trimmed) + len(scheme)
			return uriPasswordSpans(s, off)
		}
	}
	return keywordPasswordSpans(s)
}

// isPasswordKey reports whether a parameter names a secret. libpq's keywords are
// case-sensitive; any spelling is masked here.
func isPasswordKey(key string) bool {
	k := strings.ToLower(key)
	return k == "password" || k == "sslpassword"
}

// uriPasswordSpans finds the user part's password and the password query parameters of a
// URI whose authority starts at off.
func uriPasswordSpans(s string, off int) []span {
	var spans []span
	rest := s[off:]
	// The user part ends at the last "@": a password may hold an unescaped "@", "/" or
	// "?" in a malformed URI, and masking a host too many is the safe mistake.
	if at := strings.LastIndex(rest, "@"); at >= 0 {
		if colon := strings.Index(rest, ":"); colon >= 0 && colon < strings.Index(rest, "@") {
			spans = append(spans, span{off + colon + 1, off + at})
		}
	}
	// Every "?" or "&" may start a parameter: where the query begins is uncertain in a
	// malformed URI, so each is looked at.
	for i := 0; i < len(rest); i++ {
		if rest[i] != '?' && rest[i] != '&' {
			continue
		}
		from := i + 1
		end := strings.IndexAny(rest[from:], "&#")
		if end < 0 {
			end = len(rest)
		} else {
			end += from
		}
		key, _, ok := strings.Cut(rest[from:end], "=")
		if !ok {
			continue
		}
		if k, err := url.QueryUnescape(key); isPasswordKey(key) || err == nil && isPasswordKey(k) {
			spans = append(spans, span{off + from + len(key) + 1, off + end})
		}
	}
	return merged(spans)
}

// merged sorts spans and joins those that overlap.
func merged(spans []span) []span {
	sort.Slice(spans, func(i, j int) bool { return spans[i].start < spans[j].start })
	var out []span
	for _, sp := range spans {
		if n := len(out); n > 0 && sp.start <= out[n-1].end {
			out[n-1].end = max(out[n-1].end, sp.end)
			continue
		}
		out = append(out, sp)
	}
	return out
}

// keywordPasswordSpans scans a keyword/value string as libpq does: keyword, optional
// spaces, "=", optional spaces, then a value that is either quoted ('...', with \' and
// \\) or runs to the next space (with \ escaping the next character). A password keyword
// without "=" still has its next word masked: it is most likely the password.
func keywordPasswordSpans(s string) []span {
	var spans []span
	n := len(s)
	skipSpace := func(i int) int {
		for i < n && isSpace(s[i]) {
			i++
		}
		return i
	}
	i := skipSpace(0)
	for i < n {
		ks := i
		for i < n && s[i] != '=' && !isSpace(s[i]) {
			i++
		}
		key := s[ks:i]
		i = skipSpace(i)
		if i < n && s[i] == '=' {
			i = skipSpace(i + 1)
		} else if !isPasswordKey(key) {
			continue
		}
		vs := i
		if i < n && s[i] == '\'' {
			for i++; i < n; i++ {
				if s[i] == '\\' {
					i++
					continue
				}
				if s[i] == '\'' {
					i++
					break
				}
			}
		} else {
			for ; i < n && !isSpace(s[i]); i++ {
				if s[i] == '\\' {
					i++
				}
			}
		}
		i = min(i, n)
		if isPasswordKey(key) && i > vs {
			spans = append(spans, span{vs, i})
		}
		i = skipSpace(i)
	}
	return spans
}

func isSpace(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f' || c == '\v'
}

// unquote undoes a keyword/value string's quoting and escapes.
func unquote(v string) string {
	v = strings.TrimPrefix(v, "'")
	if strings.HasSuffix(v, "'") && !strings.HasSuffix(v, `\'`) {
		v = v[:len(v)-1]
	}
	var b strings.Builder
	for i := 0; i < len(v); i++ {
		if v[i] == '\\' && i+1 < len(v) {
			i++
		}
		b.WriteByte(v[i])
	}
	return b.String()
}

// percentDecoded undoes a URI's escapes; a malformed escape leaves the text as it is.
func percentDecoded(v string) string {
	if d, err := url.PathUnescape(v); err == nil {
		return d
	}
	return v
}
