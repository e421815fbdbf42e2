package server

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"mime"
	"net"
	"net/http"
	"os"
	"strconv"
	"time"

	"github.com/go-chi/chi/v5/middleware"

	"github.com/pulsewright/pulsewright/scenarios"
)

// statusError is an error the server itself raises with its status.
type statusError struct {
	status int
	msg    string
}

func (e *statusError) Error() string { return e.msg }

var (
	errUnsupportedMedia = &statusError{http.StatusUnsupportedMediaType, "the body must be JSON (Content-Type: application/json)"}
	errNoRoute          = &statusError{http.StatusNotFound, "no such endpoint"}
	errMethod           = &statusError{http.StatusMethodNotAllowed, "method not allowed on this endpoint"}
	errUnauthorized     = &statusError{http.StatusUnauthorized, "missing or wrong access token: open the URL the server printed"}
)

// errorBody is every error response: a message and, for an invalid
// scenario, one entry per problem.
type errorBody struct {
	Error  string                 `json:"error"`
	Fields []scenarios.FieldError `json:"fields"`
}

// classify maps an error to its status and the body the client sees. It
// is the one place where error kinds become statuses.
func classify(err error) (int, errorBody) {
	body := errorBody{Error: err.Error(), Fields: []scenarios.FieldError{}}
	var se *statusError
	var ve *scenarios.ValidationError
	var mbe *http.MaxBytesError
	var ce *scenarios.CostError
	var te errEvalTimeout
	switch {
	case errors.As(err, &ce):
		body.Error = ce.Error()
		body.Fields = ce.Fields()
		return http.StatusUnprocessableEntity, body
	case errors.As(err, &te):
		body.Error = te.Error()
		return http.StatusServiceUnavailable, body
	case errors.As(err, &se):
		return se.status, body
	case errors.As(err, &ve):
		body.Error = "invalid scenario"
		body.Fields = ve.Fields
		return http.StatusBadRequest, body
	case errors.As(err, &mbe):
		body.Error = "the body is larger than the limit of " + strconv.FormatInt(mbe.Limit, 10) + " bytes"
		return http.StatusRequestEntityTooLarge, body
	case errors.Is(err, scenarios.ErrTooLarge):
		return http.StatusRequestEntityTooLarge, body
	case errors.Is(err, scenarios.ErrInvalid):
		return http.StatusBadRequest, body
	case errors.Is(err, scenarios.ErrNotFound):
		return http.StatusNotFound, body
	case errors.Is(err, scenarios.ErrConflict):
		return http.StatusConflict, body
	case errors.Is(err, scenarios.ErrNotRegular):
		return http.StatusForbidden, body
	case errors.Is(err, scenarios.ErrStorage):
		return http.StatusInsufficientStorage, body
	case errors.Is(err, context.DeadlineExceeded), errors.Is(err, context.Canceled):
		body.Error = "the request was cancelled or took too long"
		return http.StatusServiceUnavailable, body
	}
	body.Error = "internal error"
	return http.StatusInternalServerError, body
}

// isTimeout reports whether err, from reading a request's body, is a
// read that passed its deadline.
func isTimeout(err error) bool {
	var ne net.Error
	return err != nil && !errors.Is(err, context.DeadlineExceeded) && (errors.Is(err, os.ErrDeadlineExceeded) || errors.As(err, &ne) && ne.Timeout())
}

// writeError sends err as JSON with its status. A 5xx is logged in full;
// the client gets a short message.
func (s *Server) writeError(w http.ResponseWriter, r *http.Request, err error) {
	status, body := classify(err)
	switch {
	case status == http.StatusInsufficientStorage:
		s.log.Warn("request failed", "method", r.Method, "path", r.URL.Path, "err", err)
	case status >= 500 && status != http.StatusServiceUnavailable:
		s.log.Error("request failed", "method", r.Method, "path", r.URL.Path, "request_id", middleware.GetReqID(r.Context()), "err", err)
	}
	writeJSON(w, status, body)
}

// writeJSON encodes v with status.
func writeJSON(w http.ResponseWriter, status int, v any) {
	data, err := json.Marshal(v)
	if err != nil {
		status = http.StatusInternalServerError
		data = []byte(`{"error":"internal error: response not encodable","fields":[]}`)
	}
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	w.WriteHeader(status)
	w.Write(append(data, '\n'))
}

// bodyTimeout is the default of Config.BodyTimeout.
const bodyTimeout = 20 * time.Second

// readBody reads a JSON request body of at most limit bytes, within the
// server's body deadline: a body that trickles in slower gets 408.
func (s *Server) readBody(w http.ResponseWriter, r *http.Request, limit int64) ([]byte, error) {
	ct := r.Header.Get("Content-Type")
	mt, _, err := mime.ParseMediaType(ct)
	if err != nil || mt != "application/json" {
		return nil, errUnsupportedMedia
	}
	rc := http.NewResponseController(w)
	rc.SetReadDeadline(time.Now().Add(s.cfg.BodyTimeout)) // not supported by every writer (tests): then ReadTimeout alone bounds it
	data, err := io.ReadAll(http.MaxBytesReader(w, r.Body, limit))
	if isTimeout(err) {
		w.Header().Set("Connection", "close")
		return nil, &statusError{http.StatusRequestTimeout, fmt.Sprintf("the request body did not arrive within %s; send it again", s.cfg.BodyTimeout)}
	}
	return data, err
}

// decodeScenario reads, decodes and validates the scenario in the body.
func (s *Server) decodeScenario(w http.ResponseWriter, r *http.Request) (*scenarios.Scenario, error) {
	data, err := s.readBody(w, r, scenarios.MaxDocumentBytes)
	if err != nil {
		return nil, err
	}
	return scenarios.Decode(data)
}

// logAttrs is a request's identity in logs.
func logAttrs(r *http.Request) []any {
	return []any{slog.String("method", r.Method), slog.String("path", r.URL.Path), slog.String("request_id", middleware.GetReqID(r.Context()))}
}
