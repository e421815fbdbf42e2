package server

import (
	"errors"
	"net/http"
	"strings"

	"github.com/go-chi/chi/v5"

	"github.com/pulsewright/pulsewright/scenarios"
)

// Saved scenarios: GET lists, GET/PUT/DELETE one by name. The revision
// travels as a strong ETag. Preconditions follow RFC 9110 §13.1: If-Match
// is * or a list of entity tags compared strongly (a weak tag W/"…" never
// matches), If-None-Match: * asks to create only. PUT without either only
// creates, so that two tabs cannot silently overwrite each other (409 when
// the name exists); DELETE needs If-Match (428 without). A precondition
// that fails is 412.

func etag(rev string) string { return `"` + rev + `"` }

var (
	errBadIfMatch      = &statusError{http.StatusBadRequest, `If-Match: want * or a comma-separated list of entity tags such as "0123456789abcdef" (RFC 9110 §13.1.1)`}
	errBadIfNoneMatch  = &statusError{http.StatusBadRequest, `If-None-Match on a save: only * (create only) is supported`}
	errNeedIfMatch     = &statusError{http.StatusPreconditionRequired, `DELETE needs If-Match: the ETag last read ("…") or * for whatever is there`}
	errBothPreconditon = &statusError{http.StatusBadRequest, "If-Match and If-None-Match together: send one"}
)

// precondition is a request's If-Match or If-None-Match as a store
// precondition: scenarios.MatchNone without either or with
// If-None-Match: *, MatchAny for If-Match: *, else the strong revisions
// listed, comma-separated (MatchNever when every tag listed is weak). has
// reports whether a precondition header was sent.
func precondition(r *http.Request) (match string, has bool, err error) {
	im, inm := r.Header.Values("If-Match"), r.Header.Values("If-None-Match")
	if len(im) > 0 && len(inm) > 0 {
		return "", true, errBothPreconditon
	}
	if len(inm) > 0 {
		if strings.TrimSpace(strings.Join(inm, ",")) != "*" {
			return "", true, errBadIfNoneMatch
		}
		return scenarios.MatchNone, true, nil
	}
	if len(im) == 0 {
		return scenarios.MatchNone, false, nil
	}
	v := strings.TrimSpace(strings.Join(im, ","))
	if v == "*" {
		return scenarios.MatchAny, true, nil
	}
	var strong []string
	for _, part := range strings.Split(v, ",") {
		part = strings.TrimSpace(part)
		if part == "" {
			continue // empty list elements are allowed (RFC 9110 §5.6.1)
		}
		weak := strings.HasPrefix(part, "W/")
		tag := strings.TrimPrefix(part, "W/")
		if len(tag) < 2 || tag[0] != '"' || tag[len(tag)-1] != '"' || strings.ContainsAny(tag[1:len(tag)-1], "\",\\ ") {
			return "", true, errBadIfMatch
		}
		if !weak {
			strong = append(strong, tag[1:len(tag)-1])
		}
	}
	if len(strong) == 0 {
		if v == "" || strings.Trim(v, ", ") == "" {
			return "", true, errBadIfMatch
		}
		return scenarios.MatchNever, true, nil
	}
	return strings.Join(strong, ","), true, nil
}

// preconditionFailed turns the store's conflict into 412 when the client
// sent a precondition header (RFC 9110 §13.1), leaving 409 for a PUT
// without one onto an existing name.
func preconditionFailed(err error, has bool) error {
	if has && errors.Is(err, scenarios.ErrConflict) {
		return &statusError{http.StatusPreconditionFailed, err.Error()}
	}
	return err
}

func (s *Server) handleSavedList(w http.ResponseWriter, r *http.Request) {
	list, err := s.store.List()
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, list)
}

func (s *Server) handleSavedGet(w http.ResponseWriter, r *http.Request) {
	data, saved, err := s.store.Get(chi.URLParam(r, "name"))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	w.Header().Set("ETag", etag(saved.Revision))
	w.Header().Set("Last-Modified", saved.Modified.Format(http.TimeFormat))
	writeRaw(w, http.StatusOK, data)
}

// handleSavedPut saves the scenario in the body: 201 when created, 200
// when replaced, with the new revision as ETag and in the body.
func (s *Server) handleSavedPut(w http.ResponseWriter, r *http.Request) {
	name := chi.URLParam(r, "name")
	if err := scenarios.ValidName(name); err != nil {
		s.writeError(w, r, err)
		return
	}
	match, has, err := precondition(r)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	sc, err := s.decodeScenario(w, r)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	// The write is not tied to the request's context: once started, a save
	// completes even if the client goes away or the server shuts down.
	saved, created, err := s.store.Put(name, sc, match)
	if err != nil {
		s.writeError(w, r, preconditionFailed(err, has))
		return
	}
	s.log.Info("scenario saved", "name", name, "revision", saved.Revision, "created", created)
	w.Header().Set("ETag", etag(saved.Revision))
	status := http.StatusOK
	if created {
		w.Header().Set("Location", "/api/v1/scenarios/"+name)
		status = http.StatusCreated
	}
	writeJSON(w, status, saved)
}

func (s *Server) handleSavedDelete(w http.ResponseWriter, r *http.Request) {
	name := chi.URLParam(r, "name")
	if err := scenarios.ValidName(name); err != nil {
		s.writeError(w, r, err)
		return
	}
	match, has, err := precondition(r)
	if err == nil && (!has || match == scenarios.MatchNone) {
		err = errNeedIfMatch
	}
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	if err := s.store.Delete(name, match); err != nil {
		s.writeError(w, r, preconditionFailed(err, has))
		return
	}
	s.log.Info("scenario deleted", "name", name)
	w.WriteHeader(http.StatusNoContent)
}
