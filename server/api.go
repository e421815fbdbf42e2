package server

import (
	"fmt"
	"net/http"
	"strings"

	"github.com/go-chi/chi/v5"

	"github.com/pulsewright/pulsewright/scenarios"
)

func (s *Server) handleHealth(w http.ResponseWriter, r *http.Request) {
	writeJSON(w, http.StatusOK, map[string]any{"status": "ok", "engine": scenarios.RunningEngine()})
}

// versionInfo is the body of GET /api/v1/version: the engine's build and
// formats (docs/report-format.md, "Engine"), and the same as one line.
type versionInfo struct {
	scenarios.EngineInfo
	Text string `json:"text"`
}

// handleVersion answers which engine computes this server's results.
func (s *Server) handleVersion(w http.ResponseWriter, r *http.Request) {
	e := scenarios.RunningEngine()
	writeJSON(w, http.StatusOK, versionInfo{EngineInfo: e, Text: e.String()})
}

// handleEvaluate evaluates the scenario in the body and returns its report.
func (s *Server) handleEvaluate(w http.ResponseWriter, r *http.Request) {
	sc, err := s.decodeScenario(w, r)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	res, err := s.admitted(r.Context(), sc, false, s.eval)
	if err != nil {
		s.writeError(w, r, fmt.Errorf("evaluate scenario %q: %w", sc.Name, err))
		return
	}
	writeJSON(w, http.StatusOK, &res.Report)
}

// linkBody is the answer of POST /api/v1/links.
type linkBody struct {
	Link string `json:"link"` // relative to the page: "/#s=…"
	URL  string `json:"url"`  // absolute, on the host the request named
}

// handleLink returns the share link of the scenario in the body.
func (s *Server) handleLink(w http.ResponseWriter, r *http.Request) {
	sc, err := s.decodeScenario(w, r)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	l, err := scenarios.Link(sc)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	body := linkBody{Link: l}
	if validHost(r.Host) {
		body.URL = "http://" + r.Host + l
	}
	writeJSON(w, http.StatusOK, body)
}

// demoBody lists one built-in scene; Start marks the one the page opens on.
type demoBody struct {
	scenarios.Demo
	Start bool `json:"start"`
}

func (s *Server) handleDemos(w http.ResponseWriter, r *http.Request) {
	ds, err := scenarios.Demos()
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	out := make([]demoBody, len(ds))
	for i, d := range ds {
		out[i] = demoBody{Demo: d, Start: d.Name == s.cfg.StartDemo}
	}
	writeJSON(w, http.StatusOK, out)
}

// handleDemo returns one built-in scene: canonical JSON, or with
// ?form=full every field with its default filled in.
func (s *Server) handleDemo(w http.ResponseWriter, r *http.Request) {
	name := chi.URLParam(r, "name")
	d, err := scenarios.LoadDemo(strings.TrimPrefix(name, "demo:"))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	switch form := r.URL.Query().Get("form"); form {
	case "", "canonical":
		data, err := scenarios.Canonical(d.Scenario)
		if err != nil {
			s.writeError(w, r, err)
			return
		}
		writeRaw(w, http.StatusOK, data)
	case "full":
		writeJSON(w, http.StatusOK, d.Scenario)
	default:
		s.writeError(w, r, &statusError{http.StatusBadRequest, fmt.Sprintf("form %q: want canonical or full", form)})
	}
}

// writeRaw sends bytes that are already JSON.
func writeRaw(w http.ResponseWriter, status int, data []byte) {
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	w.WriteHeader(status)
	w.Write(data)
}
