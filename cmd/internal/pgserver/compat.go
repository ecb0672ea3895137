package pgserver

import (
	"regexp"
	"strings"
)

// Statements PostgreSQL clients send that DuckDB does not answer the way
// they expect are recognised here and answered by plumb.

// clientParameters are PostgreSQL session parameters clients set or ask
// about; plumb records them per session and reports them, and DuckDB never
// sees them.
var clientParameters = map[string]string{
	"server_version":                      "15.0 (plumb)",
	"server_version_num":                  "150000",
	"server_encoding":                     "UTF8",
	"client_encoding":                     "UTF8",
	"datestyle":                           "ISO, MDY",
	"intervalstyle":                       "postgres",
	"timezone":                            "UTC",
	"integer_datetimes":                   "on",
	"standard_conforming_strings":         "on",
	"application_name":                    "",
	"extra_float_digits":                  "3",
	"client_min_messages":                 "notice",
	"statement_timeout":                   "0",
	"lock_timeout":                        "0",
	"idle_in_transaction_session_timeout": "0",
	"default_transaction_isolation":       "serializable",
	"transaction_isolation":               "serializable",
	"default_transaction_read_only":       "off",
	"transaction_read_only":               "off",
	"bytea_output":                        "hex",
	"search_path":                         "main",
	"is_superuser":                        "off",
	"session_authorization":               "",
	"max_identifier_length":               "63",
	"max_index_keys":                      "32",
}

// startupParameters are sent to every client after login.
var startupParameters = []string{"server_version", "server_encoding", "client_encoding", "DateStyle", "IntervalStyle",
	"TimeZone", "integer_datetimes", "standard_conforming_strings", "application_name", "is_superuser", "session_authorization"}

var (
	setStatement = regexp.MustCompile(`(?is)^\s*SET\s+(?:SESSION\s+|LOCAL\s+)?([a-z_][a-z0-9_.]*)\s*(?:=|\s+TO\s+|\s)\s*(.*?)\s*;?\s*$`)
	setTimeZone  = regexp.MustCompile(`(?is)^\s*SET\s+(?:SESSION\s+|LOCAL\s+)?TIME\s+ZONE\s+(.*?)\s*;?\s*$`)
	resetStmt    = regexp.MustCompile(`(?is)^\s*(RESET\s+\w+|RESET\s+ALL|DISCARD\s+ALL|DEALLOCATE\s+(ALL|\w+))\s*;?\s*$`)
)

// setParameter recognises SET for a client parameter and returns its name
// and value.
func setParameter(sql string) (string, string, bool) {
	if m := setTimeZone.FindStringSubmatch(sql); m != nil {
		return "timezone", unquote(m[1]), true
	}
	m := setStatement.FindStringSubmatch(sql)
	if m == nil {
		return "", "", false
	}
	name := strings.ToLower(m[1])
	if _, ok := clientParameters[name]; !ok {
		return "", "", false
	}
	return name, unquote(m[2]), true
}

// showParameter recognises SHOW of a client parameter; the words of a
// multi-word name (SHOW TRANSACTION ISOLATION LEVEL) are joined by _ and a
// trailing LEVEL dropped, as PostgreSQL names the parameter.
func showParameter(sql string) (string, bool) {
	w := words(sql)
	if len(w) < 2 || w[0] != "show" {
		return "", false
	}
	w = w[1:]
	if w[len(w)-1] == ";" {
		w = w[:len(w)-1]
	}
	if len(w) > 1 && w[len(w)-1] == "level" {
		w = w[:len(w)-1]
	}
	name := strings.Join(w, "_")
	_, ok := clientParameters[name]
	return name, ok
}

func unquote(s string) string {
	s = strings.TrimSpace(s)
	if len(s) >= 2 && (s[0] == '\'' && s[len(s)-1] == '\'' || s[0] == '"' && s[len(s)-1] == '"') {
		return strings.ReplaceAll(s[1:len(s)-1], "''", "'")
	}
	return s
}

// rewrite replaces a client's catalogue query with one DuckDB answers in the
// shape the client expects, or returns the statement unchanged.
func rewrite(sql string) string {
	if r := rewritePsqlDescribe(sql); r != "" {
		return r
	}
	return sql
}
