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

func (m mailbox[T]) put(v T) { m.swap(v) } // never blocks; replaces an unread value

// swap is put, returning the unread value it replaced, if any.
func (m mailbox[T]) swap(v T) (old T, replaced bool) {
	for {
		select {
		case m.ch <- v:
			return old, replaced
		default:
			select {
			case old = <-m.ch:
				replaced = true
			default:
			}
		}
	}
}

// want is the whole state the page asked for, as of its newest message.
// The reader owns it and posts a copy after each message. Scenarios stay
// raw until compute takes them, so that edits skipped by a faster one
// cost no decoding.
type want struct {
	gen  uint64 // counts the reader's posts
	id   int64  // the newest message's id
	scn  edit   // the newest scenario
	pin  edit   // the newest pin; raw nil when unpinned
	view view
}

// edit is a scenario as the page sent it.
type edit struct {
	seq uint64          // the gen that set it; 0 when never set
	id  int64           // its message's id
	raw json.RawMessage // the scenario document
}

// frame is a computed result waiting for the writer, which chooses per
// chart between the full option and a data-only merge.
type frame struct {
	id        int64
	report    []byte // encoded report
	reference []byte // encoded pinned report, nil when not pinned
	link      []byte // encoded link string
	charts    []chartOut
	computeMS float64
	frameStore
}

// session is one websocket connection: readLoop is the only reader,
// writeLoop the only writer, compute the only evaluator.
type session struct {
	srv    *Server
	slot   *sessionSlot
	eval   Evaluator // of the edited scenario; the pin uses srv.eval
	conn   *websocket.Conn
	log    *slog.Logger
	work   mailbox[want]
	frames mailbox[*frame]
	errs   mailbox[*errorMsg]
	free   chan *frame // frames the writer has sent, for compute to fill again
	out    []byte      // the writer's encoding buffer

	mu        sync.Mutex // guards runGen, runCancel, runStart, lastRun, recheck and lastFrame
	runGen    uint64
	runCancel context.CancelFunc
	runStart  time.Time     // when the running computation started
	lastRun   time.Duration // how long the last computation that finished took; 0: none yet
	recheck   *time.Timer   // cancels a computation that outlives its expected end
	lastFrame time.Time     // when compute last put a frame

	releases atomic.Int64 // times the idle session dropped its buffers (tests)
}

// starveAfter is the default of Config.StarveAfter, which bounds how long
// edits may keep cancelling computations: when
// the page has had no frame for this long, a computation in flight runs to
// its end (and its frame is sent) even though a newer edit is waiting, so
// that a slider dragged faster than the scene evaluates still animates.
// 50 ms lets a drag, which sends an edit per animation frame (16 ms),
// get at least about 20 pictures a second when a frame takes less than
// 50 ms to compute; a cancelled computation's work is lost, so a longer
// bound starves the page (250 ms gave 4 a second).
const starveAfter = 50 * time.Millisecond

// handleWS upgrades to a websocket and runs the session until either side
// closes it or the server shuts down. It returns only after the reader
// and the compute goroutine have stopped.
func (s *Server) handleWS(w http.ResponseWriter, r *http.Request) {
	ctx, cancel := context.WithCancelCause(s.ctx)
	defer cancel(nil)
	slot, err := s.acquireSession(clientOf(r), cancel)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	defer s.releaseSession(slot)
	conn, err := s.up.Upgrade(w, r, nil) // refuses a foreign Origin with 403
	if err != nil {
		s.log.Debug("websocket refused", "err", err, "origin", r.Header.Get("Origin"))
		return
	}
	defer conn.Close()
	sess := &session{
		srv:    s,
		slot:   slot,
		eval:   s.eval,
		conn:   conn,
		log:    s.log.With("session", s.sessionIDs.Add(1)),
		work:   newMailbox[want](),
		frames: newMailbox[*frame](),
		errs:   newMailbox[*errorMsg](),
		free:   make(chan *frame, 2),
	}
	if s.cfg.SessionEvaluator != nil {
		sess.eval = s.cfg.SessionEvaluator()
	}
	sess.log.Info("session open", "remote", r.RemoteAddr)
	var wg sync.WaitGroup
	wg.Go(func() { sess.readLoop(func() { cancel(nil) }) })
	wg.Go(func() { sess.compute(ctx) })
	sess.writeLoop(ctx)
	cancel(nil)
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
		ss.slot.touch()
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
// view change alone reuses the evaluation). Scenarios are validated by
// compute; apply checks the envelope and the view.
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
		st.scn = edit{seq: st.gen + 1, id: m.ID, raw: m.Scenario}
		return st, true, nil
	case MsgPin:
		st.pin = edit{seq: st.gen + 1, id: m.ID}
		if !isNull(m.Scenario) {
			st.pin.raw = m.Scenario
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
		st.view.mapWidth = 0
		if m.MapPx != 0 {
			st.view.mapWidth = min(max(m.MapPx, minWidthPx), maxWidthPx)
		}
		st.view.cpiMaps = m.CPIMaps
		return st, false, nil
	case MsgCell:
		st.view.cell = nil
		if c := m.Cell; c != nil {
			if !finite(c.RangeM) || !finite(c.RangeRateMPS) {
				return bad, false, fmt.Errorf("cell {range_m: %g, range_rate_mps: %g}: want finite numbers: %w", c.RangeM, c.RangeRateMPS, scenarios.ErrInvalid)
			}
			st.view.cell = &cell{rangeM: c.RangeM, rateMPS: c.RangeRateMPS}
		}
		return st, false, nil
	case MsgFloors:
		st.view.floors = nil
		if f := m.Floors; f != nil {
			if len(f.Target) > maxFloorsID || len(f.Row) > maxFloorsID {
				return bad, false, fmt.Errorf("floors {target: %.40q…}: a target id is at most %d bytes: %w", f.Target, maxFloorsID, scenarios.ErrInvalid)
			}
			st.view.floors = &floorsReq{target: f.Target, row: f.Row}
		}
		return st, false, nil
	}
	return bad, false, fmt.Errorf("unknown message type %q (want %s, %s, %s, %s or %s): %w", m.Type, MsgScenario, MsgView, MsgPin, MsgCell, MsgFloors, scenarios.ErrInvalid)
}

// maxFloorsID bounds the target ids of a floors message, bytes.
const maxFloorsID = 256

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func isNull(raw json.RawMessage) bool { return len(raw) == 0 || string(raw) == "null" }

// rejection is the error message for a rejected edit.
func rejection(id int64, err error) *errorMsg {
	m := &errorMsg{Type: MsgError, ID: id, Error: err.Error(), Fields: []scenarios.FieldError{}}
	var ve *scenarios.ValidationError
	if errors.As(err, &ve) {
		m.Error = "invalid scenario"
		var ee *editError
		if errors.As(err, &ee) && ee.pin {
			m.Error = "invalid pinned scenario"
		}
		m.Fields = ve.Fields
	}
	var ce *scenarios.CostError
	if errors.As(err, &ce) {
		m.Fields = ce.Fields()
	}
	return m
}

// finishShort is how near its expected end a computation must be for a
// newer edit to let it finish rather than cancel it: its frame is a
// picture a few ms old, while a cancel throws the work away and the page
// waits for a whole new computation. Expected from the session's last
// computation; one that outlives that is cancelled then.
const finishShort = 50 * time.Millisecond

// cancelBefore cancels the running computation if it serves a state older
// than gen, unless the page has waited Config.StarveAfter for a frame or
// the computation is expected to end within finishShort.
func (ss *session) cancelBefore(gen uint64) {
	ss.mu.Lock()
	defer ss.mu.Unlock()
	if ss.runCancel == nil || ss.runGen >= gen || time.Since(ss.lastFrame) >= ss.srv.cfg.StarveAfter {
		return
	}
	if left := ss.lastRun - time.Since(ss.runStart); ss.lastRun > 0 && left >= 0 && left < finishShort {
		// Look again just after its expected end.
		if ss.recheck != nil {
			ss.recheck.Stop()
		}
		ss.recheck = time.AfterFunc(left+time.Millisecond, func() { ss.cancelBefore(gen) })
		return
	}
	ss.runCancel()
	ss.runCancel = nil
}

// setRun records the computation that starts (cancel non-nil) or the end
// of the running one, and how long it took when it finished uncancelled.
func (ss *session) setRun(gen uint64, cancel context.CancelFunc, finished bool) {
	ss.mu.Lock()
	now := time.Now()
	if cancel == nil && finished {
		ss.lastRun = now.Sub(ss.runStart)
	}
	ss.runGen, ss.runCancel, ss.runStart = gen, cancel, now
	ss.mu.Unlock()
}

// framed records that a frame went to the writer.
func (ss *session) framed() {
	ss.mu.Lock()
	ss.lastFrame = time.Now()
	ss.mu.Unlock()
}
