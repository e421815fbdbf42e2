package server

import (
	"net/http"
	"strings"

	"github.com/go-chi/chi/v5"

	"github.com/pulsewright/pulsewright/scenarios"
)

// Saved scenarios: GET lists, GET/PUT/DELETE one by name. The revision
// travels as a strong ETag; PUT without If-Match only creates, so that
// two tabs cannot silently overwrite each other, and a stale If-Match is
// a 409 Conflict.

func etag(rev string) string { return `"` + rev + `"` }

// ifMatch returns the precondition of a request: scenarios.MatchNone
// without If-Match, MatchAny for *, else the revision named.
func ifMatch(r *http.Request) string {
	v := strings.TrimSpace(r.Header.Get("If-Match"))
	if v == "" || v == "*" {
		return v
	}
	v = strings.TrimPrefix(v, "W/")
	return strings.Trim(v, `"`)
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
	sc, err := s.decodeScenario(w, r)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	// The write is not tied to the request's context: once started, a save
	// completes even if the client goes away or the server shuts down.
	saved, created, err := s.store.Put(name, sc, ifMatch(r))
	if err != nil {
		s.writeError(w, r, err)
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
	if err := s.store.Delete(name, ifMatch(r)); err != nil {
		s.writeError(w, r, err)
		return
	}
	s.log.Info("scenario deleted", "name", name)
	w.WriteHeader(http.StatusNoContent)
}
