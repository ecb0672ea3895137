package pgserver

import (
	"context"
	"errors"
	"strings"

	"github.com/duckdb/duckdb-go/v2"
	"github.com/jackc/pgx/v5/pgproto3"
)

// SQLSTATE codes plumb sends (PostgreSQL Appendix A).
const (
	stateSyntax             = "42601"
	stateUndefinedTable     = "42P01"
	stateUndefinedParameter = "42P02"
	stateUndefinedColumn    = "42703"
	stateUndefinedFunction  = "42883"
	stateInsufficientPriv   = "42501"
	stateInvalidText        = "22P02"
	stateDivisionByZero     = "22012"
	stateInvalidParameter   = "22023"
	stateNumericRange       = "22003"
	stateConstraint         = "23000"
	stateQueryCanceled      = "57014"
	stateOutOfMemory        = "53200"
	stateTooManyConns       = "53300"
	stateInFailedTxn        = "25P02"
	stateActiveTxn          = "25001"
	stateNoActiveTxn        = "25P01"
	stateReadOnlyTxn        = "25006"
	stateInvalidCursor      = "34000"
	stateDuplicateCursor    = "42P03"
	stateInvalidCursorDef   = "42P11"
	stateBadCopyData        = "22P04"
	stateFeatureNotSupport  = "0A000"
	stateProtocolViolation  = "08P01"
	stateInvalidPassword    = "28P01"
	stateInvalidAuthSpec    = "28000"
	stateAdminShutdown      = "57P01"
	stateIO                 = "58030"
	stateInternal           = "XX000"
)

// sqlState maps an error from DuckDB (or from plumb) to a SQLSTATE.
func sqlState(err error) string {
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return stateQueryCanceled
	}
	var de *duckdb.Error
	if !errors.As(err, &de) {
		return stateInternal
	}
	msg := de.Msg
	switch de.Type {
	case duckdb.ErrorTypeParser, duckdb.ErrorTypeSyntax:
		return stateSyntax
	case duckdb.ErrorTypeCatalog:
		if strings.Contains(msg, "Function") || strings.Contains(msg, "function") || strings.Contains(msg, "Macro") {
			return stateUndefinedFunction
		}
		return stateUndefinedTable
	case duckdb.ErrorTypeBinder:
		if strings.Contains(msg, "column") || strings.Contains(msg, "COLUMNS") {
			return stateUndefinedColumn
		}
		if strings.Contains(msg, "function") {
			return stateUndefinedFunction
		}
		return stateSyntax
	case duckdb.ErrorTypeConversion, duckdb.ErrorTypeMismatchType, duckdb.ErrorTypeInvalidType:
		return stateInvalidText
	case duckdb.ErrorTypeDivideByZero:
		return stateDivisionByZero
	case duckdb.ErrorTypeOutOfRange, duckdb.ErrorTypeDecimal:
		return stateNumericRange
	case duckdb.ErrorTypeConstraint:
		return stateConstraint
	case duckdb.ErrorTypePermission:
		return stateInsufficientPriv
	case duckdb.ErrorTypeInterrupt:
		return stateQueryCanceled
	case duckdb.ErrorTypeOutOfMemory:
		return stateOutOfMemory
	case duckdb.ErrorTypeInvalidInput, duckdb.ErrorTypeParameterNotResolved, duckdb.ErrorTypeParameterNotAllowed:
		if strings.Contains(msg, "configuration has been locked") || strings.Contains(msg, "disabled") {
			return stateInsufficientPriv
		}
		return stateInvalidParameter
	case duckdb.ErrorTypeTransaction:
		return stateInFailedTxn
	case duckdb.ErrorTypeNotImplemented:
		return stateFeatureNotSupport
	case duckdb.ErrorTypeIO:
		return stateIO
	}
	return stateInternal
}

// errorResponse builds the message for err.
func errorResponse(err error) *pgproto3.ErrorResponse {
	msg := err.Error()
	first, detail, _ := strings.Cut(msg, "\n")
	return &pgproto3.ErrorResponse{Severity: "ERROR", SeverityUnlocalized: "ERROR", Code: sqlState(err),
		Message: strings.TrimSpace(first), Detail: strings.TrimSpace(detail)}
}

// pgError is an error plumb raises itself with a chosen SQLSTATE.
type pgError struct {
	code, msg string
}

func (e pgError) Error() string { return e.msg }

func responseFor(err error) *pgproto3.ErrorResponse {
	var pe pgError
	if errors.As(err, &pe) {
		return &pgproto3.ErrorResponse{Severity: "ERROR", SeverityUnlocalized: "ERROR", Code: pe.code, Message: pe.msg}
	}
	return errorResponse(err)
}

// responseFor is the package's responseFor with the server's own paths
// taken out of the message: a client learns where a file it named is in its
// own words, never where the server keeps its files.
func (sess *session) responseFor(err error) *pgproto3.ErrorResponse {
	r := responseFor(err)
	if sess.srv.files != nil {
		r.Message = sess.srv.files.Scrub(r.Message)
		r.Detail = sess.srv.files.Scrub(r.Detail)
	}
	return r
}
