package server

import (
	"crypto/sha256"
	"crypto/subtle"
	"fmt"
	"net"
	"net/http"
	"runtime/debug"
	"strings"
	"time"

	"github.com/go-chi/chi/v5/middleware"
)

// requestLogger logs each request at Debug (Info for a 5xx is left to
// writeError) with its status and duration.
func (s *Server) requestLogger(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		ww := middleware.NewWrapResponseWriter(w, r.ProtoMajor)
		start := time.Now()
		next.ServeHTTP(ww, r)
		s.log.Debug("request", append(logAttrs(r), "status", ww.Status(), "bytes", ww.BytesWritten(), "duration", time.Since(start))...)
	})
}

// recoverer turns a panic in a handler into a logged 500.
func (s *Server) recoverer(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		defer func() {
			if v := recover(); v != nil {
				if v == http.ErrAbortHandler {
					panic(v)
				}
				s.writeError(w, r, fmt.Errorf("panic: %v\n%s", v, debug.Stack()))
			}
		}()
		next.ServeHTTP(w, r)
	})
}

// securityHeaders sets a strict content security policy and its
// companions on every response. The page loads only its own scripts and
// styles (no inline code, no eval), and talks only to this origin, over
// HTTP and over the websocket of the same host: 'self' covers ws: to the
// same host only in newer browsers, so the ws:// and wss:// sources name
// it explicitly. ECharts sets styles through the CSSOM, which style-src
// does not restrict.
func securityHeaders(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		h := w.Header()
		connect := "'self'"
		if validHost(r.Host) {
			connect += " ws://" + r.Host + " wss://" + r.Host
		}
		h.Set("Content-Security-Policy", "default-src 'self'; script-src 'self'; style-src 'self'; "+
			"img-src 'self' data: blob:; font-src 'self'; connect-src "+connect+"; worker-src 'self'; "+
			"object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'")
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("X-Frame-Options", "DENY")
		h.Set("Referrer-Policy", "no-referrer")
		h.Set("Cross-Origin-Opener-Policy", "same-origin")
		h.Set("Cross-Origin-Resource-Policy", "same-origin")
		if strings.HasPrefix(r.URL.Path, "/api/") {
			h.Set("Cache-Control", "no-store")
		}
		next.ServeHTTP(w, r)
	})
}

// validHost reports whether a Host header is a plain host[:port] that is
// safe to copy into a header value.
func validHost(h string) bool {
	if h == "" || len(h) > 255 {
		return false
	}
	for _, c := range h {
		if !(c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || strings.ContainsRune(".-:[]", c)) {
			return false
		}
	}
	return true
}

// tokenCookie is the prefix of the cookie that carries the access token
// after the first page load. Cookies are per host, not per port, so the
// name carries the server's port: two servers on one machine keep a
// cookie each instead of logging each other out.
const tokenCookie = "pulsewright_token"

// cookieName returns the token cookie's name for the server that took r:
// tokenCookie_PORT, the port of the local address the request came in on.
func cookieName(r *http.Request) string {
	if a, ok := r.Context().Value(http.LocalAddrContextKey).(net.Addr); ok {
		if _, port, err := net.SplitHostPort(a.String()); err == nil {
			return tokenCookie + "_" + port
		}
	}
	return tokenCookie
}

// requireToken admits a request only with the server's access token, as
// ?token=, the cookie, or an Authorization: Bearer header, compared in
// constant time. A page load with ?token= sets the cookie and is
// redirected to the same URL without it, so the token leaves the address
// bar (the #fragment of a share link survives the redirect).
func (s *Server) requireToken(next http.Handler) http.Handler {
	if s.token == "" {
		return next
	}
	want := sha256.Sum256([]byte(s.token))
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		tok, fromQuery := presentedToken(r)
		got := sha256.Sum256([]byte(tok))
		if subtle.ConstantTimeCompare(got[:], want[:]) != 1 {
			s.writeError(w, r, errUnauthorized)
			return
		}
		if fromQuery {
			http.SetCookie(w, &http.Cookie{Name: cookieName(r), Value: tok, Path: "/", HttpOnly: true, SameSite: http.SameSiteStrictMode})
			if r.Method == http.MethodGet && !strings.HasPrefix(r.URL.Path, "/api/") && r.URL.Path != "/ws" {
				u := *r.URL
				q := u.Query()
				q.Del("token")
				u.RawQuery = q.Encode()
				http.Redirect(w, r, u.RequestURI(), http.StatusSeeOther)
				return
			}
		}
		next.ServeHTTP(w, r)
	})
}

func presentedToken(r *http.Request) (tok string, fromQuery bool) {
	if t := r.URL.Query().Get("token"); t != "" {
		return t, true
	}
	if a := r.Header.Get("Authorization"); len(a) > 7 && strings.EqualFold(a[:7], "bearer ") {
		return strings.TrimSpace(a[7:]), false
	}
	if c, err := r.Cookie(cookieName(r)); err == nil {
		return c.Value, false
	}
	return "", false
}

// noListing answers 404 for a directory other than the root, so that the
// file server shows files but never lists them.
func (s *Server) noListing(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.URL.Path != "/" && strings.HasSuffix(r.URL.Path, "/") {
			s.writeError(w, r, errNoRoute)
			return
		}
		next.ServeHTTP(w, r)
	})
}

// headAsGet answers HEAD on every GET route: the request is routed as a
// GET, and net/http, which knows the request was a HEAD, sends the
// headers and drops the body.
func headAsGet(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.Method == http.MethodHead {
			r = r.Clone(r.Context())
			r.Method = http.MethodGet
		}
		next.ServeHTTP(w, r)
	})
}
