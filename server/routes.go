package server

import (
	"net/http"

	"github.com/go-chi/chi/v5"
	"github.com/go-chi/chi/v5/middleware"
)

// Handler returns the server's routes: the one route table.
func (s *Server) Handler() http.Handler {
	r := chi.NewRouter()
	r.Use(middleware.RequestID, s.recoverer, s.requestLogger, securityHeaders, s.checkHost, s.requireToken, headAsGet)
	r.NotFound(func(w http.ResponseWriter, r *http.Request) { s.writeError(w, r, errNoRoute) })
	r.MethodNotAllowed(func(w http.ResponseWriter, r *http.Request) { s.writeError(w, r, errMethod) })

	// GET /healthz: liveness, {"status":"ok","engine":{…}}.
	r.Get("/healthz", s.handleHealth)

	// GET /ws: the live session (websocket; no request timeout).
	r.Get("/ws", s.handleWS)

	r.Route("/api/v1", func(r chi.Router) {
		r.Use(middleware.Timeout(s.cfg.APITimeout))
		r.NotFound(func(w http.ResponseWriter, r *http.Request) { s.writeError(w, r, errNoRoute) })
		r.MethodNotAllowed(func(w http.ResponseWriter, r *http.Request) { s.writeError(w, r, errMethod) })

		// GET /version: the engine's version and formats, {version, commit, modified, scenario_format, report_format, text}.
		r.Get("/version", s.handleVersion)
		// POST /evaluate: scenario in, report out.
		r.Post("/evaluate", s.handleEvaluate)
		// POST /links: scenario in, {"link": "/#s=…"} out.
		r.Post("/links", s.handleLink)
		// POST /coverage?target=ID[&points=N]: scenario in, {coverage, option} out (the Pd curves of one target).
		r.Post("/coverage", s.handleCoverage)

		// GET /demos: the built-in scenes, [{name, title, summary, start}].
		r.Get("/demos", s.handleDemos)
		// GET /demos/{name}: a built-in scene's canonical JSON (?form=full: every default filled in).
		r.Get("/demos/{name}", s.handleDemo)

		r.Route("/scenarios", func(r chi.Router) {
			// GET /scenarios: saved scenarios, [{name, title, revision, modified}].
			r.Get("/", s.handleSavedList)
			// GET /scenarios/{name}: the saved canonical JSON, ETag = revision.
			r.Get("/{name}", s.handleSavedGet)
			// PUT /scenarios/{name}: save; If-Match: "rev", a list or * to replace; none or If-None-Match: * to create.
			r.Put("/{name}", s.handleSavedPut)
			// DELETE /scenarios/{name}: remove; If-Match: "rev" or * required (428 without).
			r.Delete("/{name}", s.handleSavedDelete)
		})
	})

	// Everything else: the page's files (no directory listings).
	r.Handle("/*", s.noListing(http.FileServerFS(s.static)))
	return r
}
