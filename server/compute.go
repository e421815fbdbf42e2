package server

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"time"

	"github.com/gorilla/websocket"

	"github.com/pulsewright/pulsewright/scenarios"
)

// evalCache keeps the last evaluations of a session, so that a view
// change re-decimates without evaluating again.
type evalCache struct {
	scn    *scenarios.Scenario
	res    *scenarios.Result
	link   string
	pin    *scenarios.Scenario
	pinRes *scenarios.Result
}

// compute evaluates the newest state the reader posted and puts its frame
// for the writer. A computation the reader cancels as stale is dropped.
func (ss *session) compute(ctx context.Context) {
	var cache evalCache
	for {
		var w want
		select {
		case <-ctx.Done():
			return
		case w = <-ss.work.ch:
		}
		if w.scn == nil {
			continue // a view or pin before the first scenario: nothing to show yet
		}
		runCtx, cancel := context.WithCancel(ctx)
		ss.setRun(w.gen, cancel)
		f, err := ss.evaluate(runCtx, w, &cache)
		stale := runCtx.Err() != nil
		ss.setRun(0, nil)
		cancel()
		switch {
		case ctx.Err() != nil:
			return
		case stale:
			ss.log.Debug("computation superseded", "id", w.id)
		case err != nil:
			ss.errs.put(ss.evalError(w.id, err))
		default:
			ss.frames.put(f)
		}
	}
}

// evaluate makes the frame of one state.
func (ss *session) evaluate(ctx context.Context, w want, c *evalCache) (*frame, error) {
	start := time.Now()
	if w.scn != c.scn {
		res, err := ss.srv.eval(ctx, w.scn)
		if err != nil {
			return nil, err
		}
		link, err := scenarios.Link(w.scn)
		if err != nil {
			return nil, err
		}
		c.scn, c.res, c.link = w.scn, res, link
	}
	var ref *scenarios.Result
	if w.pin != nil {
		if w.pin != c.pin {
			res, err := ss.srv.eval(ctx, w.pin)
			if err != nil {
				return nil, fmt.Errorf("pinned scenario: %w", err)
			}
			c.pin, c.pinRes = w.pin, res
		}
		ref = c.pinRes
	}
	f := &frame{id: w.id, report: &c.res.Report, link: c.link, charts: buildCharts(c.res, ref, w.view)}
	if ref != nil {
		f.reference = &ref.Report
	}
	f.computeMS = math.Round(float64(time.Since(start).Microseconds())/10) / 100
	return f, nil
}

// evalError is the message for an evaluation that failed. Faults of the
// scenario go to the page as they are; internal ones are logged and
// reported briefly.
func (ss *session) evalError(id int64, err error) *errorMsg {
	if errors.Is(err, scenarios.ErrInvalid) || errors.Is(err, scenarios.ErrTooLarge) {
		return rejection(id, err)
	}
	ss.log.Error("evaluate", "id", id, "err", err)
	return rejection(id, errors.New("internal error while evaluating the scenario"))
}

// message renders a frame for a page that holds the chart structures in
// sent: a chart whose structure key is unchanged gets a data-only merge.
func (f *frame) message(sent map[string]string) *frameMsg {
	m := &frameMsg{Type: MsgFrame, ID: f.id, Report: f.report, Link: f.link, Reference: f.reference, ComputeMS: f.computeMS,
		Charts: make(map[string]chartMsg, len(f.charts))}
	for _, c := range f.charts {
		if sent[c.name] == c.key {
			m.Charts[c.name] = chartMsg{Replace: false, Option: c.merge()}
		} else {
			m.Charts[c.name] = chartMsg{Replace: true, Option: c.option}
		}
	}
	return m
}

// writeLoop is the session's only writer. It sends the newest frame and
// error, pings, and on exit a close frame.
func (ss *session) writeLoop(ctx context.Context) {
	ticker := time.NewTicker(pingPeriod)
	defer ticker.Stop()
	sent := map[string]string{} // chart name → structure key the page holds
	lastFrame := int64(math.MinInt64)
	for {
		select {
		case <-ctx.Done():
			code, text := websocket.CloseNormalClosure, ""
			if ss.srv.ctx.Err() != nil {
				code, text = websocket.CloseGoingAway, "server shutting down"
			}
			ss.conn.WriteControl(websocket.CloseMessage, websocket.FormatCloseMessage(code, text), time.Now().Add(writeWait))
			return
		case f := <-ss.frames.ch:
			if err := ss.write(f.message(sent)); err != nil {
				return
			}
			for _, c := range f.charts {
				sent[c.name] = c.key
			}
			lastFrame = f.id
			ss.log.Debug("frame", "id", f.id, "compute_ms", f.computeMS)
		case e := <-ss.errs.ch:
			if e.ID < lastFrame {
				continue // a newer edit was shown already
			}
			if err := ss.write(e); err != nil {
				return
			}
		case <-ticker.C:
			ss.conn.SetWriteDeadline(time.Now().Add(writeWait))
			if err := ss.conn.WriteMessage(websocket.PingMessage, nil); err != nil {
				return
			}
		}
	}
}

// write sends one JSON message under a write deadline. A message that
// cannot be encoded is logged and replaced by an error message.
func (ss *session) write(v any) error {
	data, err := json.Marshal(v)
	if err != nil {
		ss.log.Error("encode message", "err", err)
		data, _ = json.Marshal(&errorMsg{Type: MsgError, Error: "internal error: the result could not be encoded", Fields: []scenarios.FieldError{}})
	}
	ss.conn.SetWriteDeadline(time.Now().Add(writeWait))
	return ss.conn.WriteMessage(websocket.TextMessage, data)
}
