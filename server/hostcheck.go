package server

import (
	"fmt"
	"net"
	"net/http"
	"net/netip"
	"strings"
)

// hostAllowed reports whether a request's Host header names this server
// in a way a DNS-rebinding page cannot forge: an IP literal (a page can
// only reach an address by that address, and its origin is then the
// address itself), localhost or a name under .localhost, the host the
// server was bound to, or a name the user allowed with --allowed-host.
// A rebinding attack needs a domain name of its own, which none of
// these is.
func (s *Server) hostAllowed(hostport string) bool {
	host := hostport
	if h, _, err := net.SplitHostPort(hostport); err == nil {
		host = h
	}
	host = strings.ToLower(strings.TrimSuffix(strings.Trim(host, "[]"), "."))
	if host == "" {
		return false
	}
	if _, err := netip.ParseAddr(host); err == nil {
		return true
	}
	if host == "localhost" || strings.HasSuffix(host, ".localhost") {
		return true
	}
	_, ok := s.hosts[host]
	return ok
}

// allowedHosts returns the set of names accepted besides IP literals and
// localhost: the bound host when it is a name, and cfg.AllowedHosts.
func allowedHosts(bind string, extra []string) (map[string]struct{}, error) {
	set := map[string]struct{}{}
	add := func(h string) {
		h = strings.ToLower(strings.TrimSuffix(strings.TrimSpace(h), "."))
		if h != "" {
			set[h] = struct{}{}
		}
	}
	if _, err := netip.ParseAddr(bind); err != nil {
		add(bind)
	}
	for _, h := range extra {
		h = strings.TrimSpace(h)
		if h == "" {
			continue
		}
		if strings.ContainsAny(h, ":/ ") || !validHost(h) {
			return nil, fmt.Errorf("allowed host %q: want a host name without port or scheme (e.g. workbench.lab.example)", h)
		}
		add(h)
	}
	return set, nil
}

// checkHost refuses a request whose Host header is not one this server
// answers to, with 421 Misdirected Request: the defence against DNS
// rebinding, where a foreign page's own domain is made to resolve to
// 127.0.0.1. It covers the websocket too, whose Origin check alone
// passes when Origin and Host name the same foreign domain.
func (s *Server) checkHost(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if !s.hostAllowed(r.Host) {
			s.log.Warn("foreign Host refused", append(logAttrs(r), "host", clip(r.Host, 80))...)
			s.writeError(w, r, &statusError{http.StatusMisdirectedRequest, fmt.Sprintf(
				"host %q is not served here: this server answers to localhost, IP addresses and the names given with --allowed-host (PULSEWRIGHT_ALLOWED_HOSTS)", clip(r.Host, 80))})
			return
		}
		next.ServeHTTP(w, r)
	})
}

// clip shortens s to at most n runes for echoing in a message, marking
// the cut.
func clip(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n]) + fmt.Sprintf("… (%d characters)", len(r))
}
