package server

import (
	"context"
	"errors"
	"fmt"
	"net"
	"net/http"
	"sync/atomic"
	"time"
)

// sessionSlot is one open websocket session as the server counts it:
// its client, when it last sent a message, and how to end it.
type sessionSlot struct {
	client  string       // remote IP
	lastMsg atomic.Int64 // unix nanoseconds of the last client message (or the open)
	cancel  context.CancelCauseFunc
	gone    bool // evicted: no longer counted (guarded by Server.mu)
}

func (sl *sessionSlot) touch() { sl.lastMsg.Store(time.Now().UnixNano()) }

func (sl *sessionSlot) idle(now time.Time) time.Duration {
	return now.Sub(time.Unix(0, sl.lastMsg.Load()))
}

// Causes that end a session from the server's side.
var (
	errEvicted    = errors.New("closed to make room for a newer session: it had been idle")
	errIdleClosed = errors.New("closed after a long time without a message")
)

// clientOf returns the remote IP of a request.
func clientOf(r *http.Request) string {
	if h, _, err := net.SplitHostPort(r.RemoteAddr); err == nil {
		return h
	}
	return r.RemoteAddr
}

// acquireSession reserves a session slot for client. When the server, or
// the client, is at its cap, the session of the same scope that has been
// idle longest, for at least EvictAfter, is ended to make room; with none
// such the new session is refused with 503 and a message naming the cap.
func (s *Server) acquireSession(client string, cancel context.CancelCauseFunc) (*sessionSlot, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.closing {
		return nil, &statusError{http.StatusServiceUnavailable, "the server is shutting down"}
	}
	now := time.Now()
	mine := 0
	for sl := range s.live {
		if sl.client == client {
			mine++
		}
	}
	evict := func(sameClient bool) bool {
		var victim *sessionSlot
		for sl := range s.live {
			if sameClient && sl.client != client {
				continue
			}
			if sl.idle(now) >= s.cfg.EvictAfter && (victim == nil || sl.idle(now) > victim.idle(now)) {
				victim = sl
			}
		}
		if victim == nil {
			return false
		}
		victim.gone = true
		delete(s.live, victim)
		victim.cancel(errEvicted)
		s.log.Info("idle session evicted", "client", victim.client, "idle", victim.idle(now).Round(time.Second))
		return true
	}
	if mine >= s.cfg.MaxSessionsPerClient && !evict(true) {
		return nil, &statusError{http.StatusServiceUnavailable, fmt.Sprintf(
			"too many open sessions from %s (the limit is %d per client, and none has been idle for %s); close a tab and reload", client, s.cfg.MaxSessionsPerClient, s.cfg.EvictAfter)}
	}
	if len(s.live) >= s.cfg.MaxSessions && !evict(false) {
		return nil, &statusError{http.StatusServiceUnavailable, fmt.Sprintf(
			"too many open sessions (the limit is %d, and none has been idle for %s); close a tab and reload", s.cfg.MaxSessions, s.cfg.EvictAfter)}
	}
	sl := &sessionSlot{client: client, cancel: cancel}
	sl.touch()
	s.live[sl] = struct{}{}
	s.sessions.Add(1)
	return sl, nil
}

func (s *Server) releaseSession(sl *sessionSlot) {
	s.mu.Lock()
	if !sl.gone {
		delete(s.live, sl)
	}
	s.mu.Unlock()
	s.sessions.Done()
}
