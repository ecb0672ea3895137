package explorer

import (
	"errors"
	"fmt"
	"net/http"
)

// badRequest is an error in what the request asked (an unknown parameter,
// a value not allowed): answered 400 with the message.
type badRequest struct{ error }

func errorf(format string, args ...any) error { return fmt.Errorf(format, args...) }

func statusOf(err error) int {
	var b badRequest
	if errors.As(err, &b) {
		return http.StatusBadRequest
	}
	return http.StatusInternalServerError
}
