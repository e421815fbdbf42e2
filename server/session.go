package server

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"log/slog"
	"math"
	"net/http"
	"sync"
	"sync/atomic"
	"time"

	"github.com/gorilla/websocket"

	"github.com/pulsewright/pulsewright/scenarios"
)

// Websocket timing and limits.
const (
	writeWait  = 10 * time.Second                    // deadline of one write
	pongWait   = 60 * time.Second                    // a pong must come within this
	pingPeriod = pongWait * 9 / 10                   // pings go out this often
	maxMessage = scenarios.MaxDocumentBytes + 64<<10 // bytes of one client message: a scenario and its envelope
)

// mailbox holds at most one value; put replaces an unread one, so a slow
// consumer skips to the newest value instead of queueing.
type mailbox[T any] struct{ ch chan T }

func newMailbox[T any]() mailbox[T] { return mailbox[T]{ch: make(chan T, 1)} }

func (m mailbox[T]) put(v T) { // never blocks; replaces an unread value
	for {
		select {
		case m.ch <- v:
			return
		default:
			select {
			case <-m.ch:
			default:
			}
		}
	}
}

// want is the whole state the page asked for, as of its newest message.
// The reader owns it and posts a copy after each message.
type want struct {
	gen  uint64 // counts the reader's posts
	id   int64  // the newest message's id
	scn  *scenarios.Scenario
	pin  *scenarios.Scenario
	view view
}

// frame is a computed result waiting for the writer, which chooses per
// chart between the full option and a data-only merge.
type frame struct {
	id        int64
	report    *scenarios.Report
	reference *scenarios.Report
	link      string
	charts    []chartOut
	computeMS float64
}

var sessionIDs atomic.Uint64

// session is one websocket connection: readLoop is the only reader,
// writeLoop the only writer, compute the only evaluator.
type session struct {
	srv    *Server
	conn   *websocket.Conn
	log    *slog.Logger
	work   mailbox[want]
	frames mailbox[*frame]
	errs   mailbox[*errorMsg]

	mu        sync.Mutex // guards runGen and runCancel
	runGen    uint64
	runCancel context.CancelFunc
}

// handleWS upgrades to a websocket and runs the session until either side
// closes it or the server shuts down. It returns only after the reader
// and the compute goroutine have stopped.
func (s *Server) handleWS(w http.ResponseWriter, r *http.Request) {
	if !s.acquireSession() {
		s.writeError(w, r, errTooManySessions)
		return
	}
	defer s.releaseSession()
	conn, err := s.up.Upgrade(w, r, nil) // refuses a foreign Origin with 403
	if err != nil {
		s.log.Debug("websocket refused", "err", err, "origin", r.Header.Get("Origin"))
		return
	}
	defer conn.Close()
	sess := &session{
		srv:    s,
		conn:   conn,
		log:    s.log.With("session", sessionIDs.Add(1)),
		work:   newMailbox[want](),
		frames: newMailbox[*frame](),
		errs:   newMailbox[*errorMsg](),
	}
	sess.log.Info("session open", "remote", r.RemoteAddr)
	ctx, cancel := context.WithCancel(s.ctx)
	var wg sync.WaitGroup
	wg.Go(func() { sess.readLoop(cancel) })
	wg.Go(func() { sess.compute(ctx) })
	sess.writeLoop(ctx)
	cancel()
	conn.Close() // unblocks the reader
	wg.Wait()
	sess.log.Info("session closed")
}

// readLoop reads client messages, validates them and posts the new state
// to compute, cancelling a computation the new state makes stale. It
// cancels the session when the connection fails.
func (ss *session) readLoop(cancel context.CancelFunc) {
	defer cancel()
	ss.conn.SetReadLimit(maxMessage)
	ss.conn.SetReadDeadline(time.Now().Add(pongWait))
	ss.conn.SetPongHandler(func(string) error { return ss.conn.SetReadDeadline(time.Now().Add(pongWait)) })
	st := want{view: view{width: defaultWidthPx}}
	for {
		kind, data, err := ss.conn.ReadMessage()
		if err != nil {
			if !websocket.IsCloseError(err, websocket.CloseNormalClosure, websocket.CloseGoingAway, websocket.CloseNoStatusReceived) {
				ss.log.Debug("read", "err", err)
			}
			return
		}
		ss.conn.SetReadDeadline(time.Now().Add(pongWait))
		if kind != websocket.TextMessage {
			ss.errs.put(&errorMsg{Type: MsgError, Error: "binary messages are not part of the protocol", Fields: []scenarios.FieldError{}})
			continue
		}
		next, stale, err := apply(st, data)
		if err != nil {
			ss.errs.put(rejection(next.id, err))
			continue
		}
		next.gen = st.gen + 1
		st = next
		ss.work.put(st)
		if stale {
			ss.cancelBefore(st.gen)
		}
	}
}

// apply returns the state after one client message, and whether it makes
// a computation of the previous state useless (a new scenario or pin; a
// view change alone reuses the evaluation). On error the returned state
// carries only the message's id.
func apply(st want, data []byte) (want, bool, error) {
	var m inMsg
	if err := json.Unmarshal(data, &m); err != nil {
		return want{}, false, fmt.Errorf("message is not a JSON object with a type: %v: %w", err, scenarios.ErrInvalid)
	}
	st.id = m.ID
	bad := want{id: m.ID}
	switch m.Type {
	case MsgScenario:
		if isNull(m.Scenario) {
			return bad, false, fmt.Errorf("scenario message without a scenario: %w", scenarios.ErrInvalid)
		}
		sc, err := scenarios.Decode(m.Scenario)
		if err != nil {
			return bad, false, err
		}
		st.scn = sc
		return st, true, nil
	case MsgPin:
		st.pin = nil
		if !isNull(m.Scenario) {
			sc, err := scenarios.Decode(m.Scenario)
			if err != nil {
				return bad, false, fmt.Errorf("pinned scenario: %w", err)
			}
			st.pin = sc
		}
		return st, true, nil
	case MsgView:
		if m.RangeM != nil {
			a, b := m.RangeM[0], m.RangeM[1]
			if math.IsNaN(a) || math.IsNaN(b) || math.IsInf(a, 0) || math.IsInf(b, 0) || !(a < b) {
				return bad, false, fmt.Errorf("view range_m [%g, %g]: want two finite numbers, a < b: %w", a, b, scenarios.ErrInvalid)
			}
		}
		st.view.rangeM = m.RangeM
		if m.WidthPx != 0 {
			st.view.width = min(max(m.WidthPx, minWidthPx), maxWidthPx)
		}
		return st, false, nil
	}
	return bad, false, fmt.Errorf("unknown message type %q (want %s, %s or %s): %w", m.Type, MsgScenario, MsgView, MsgPin, scenarios.ErrInvalid)
}

func isNull(raw json.RawMessage) bool { return len(raw) == 0 || string(raw) == "null" }

// rejection is the error message for a rejected edit.
func rejection(id int64, err error) *errorMsg {
	m := &errorMsg{Type: MsgError, ID: id, Error: err.Error(), Fields: []scenarios.FieldError{}}
	var ve *scenarios.ValidationError
	if errors.As(err, &ve) {
		m.Error = "invalid scenario"
		m.Fields = ve.Fields
	}
	return m
}

// cancelBefore cancels the running computation if it serves a state older
// than gen.
func (ss *session) cancelBefore(gen uint64) {
	ss.mu.Lock()
	defer ss.mu.Unlock()
	if ss.runCancel != nil && ss.runGen < gen {
		ss.runCancel()
		ss.runCancel = nil
	}
}

func (ss *session) setRun(gen uint64, cancel context.CancelFunc) {
	ss.mu.Lock()
	ss.runGen, ss.runCancel = gen, cancel
	ss.mu.Unlock()
}
