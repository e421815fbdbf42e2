package server

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"log/slog"
	"math"
	"slices"
	"strconv"
	"sync"
	"time"

	"github.com/gorilla/websocket"

	"github.com/pulsewright/pulsewright/scenarios"
)

// evalCache is compute's memory: the last good scenario and pin, their
// evaluations, and which edits it has taken, so that a view change
// re-decimates without evaluating again and a rejected edit leaves the
// last good scenario in place.
type evalCache struct {
	scnSeq, pinSeq uint64 // the edits taken last

	scn    *scenarios.Scenario // the last good scenario
	res    *scenarios.Result
	report []byte // encoded report
	link   []byte // encoded link string

	pin     *scenarios.Scenario // nil when unpinned
	pinRes  *scenarios.Result
	pinRept []byte

	// The velocity response chart of the last staggered scenario, by
	// velocityKey: rebuilt only when a stagger's inputs change.
	velKey string
	velOut chartOut
	velOK  bool

	ambKey string     // the waveform and sample rate the surface is of
	amb    []chartOut // the surface and its cuts; nil when there is none

	waveKey string     // the waveform, receiver and sample rate the designer's charts are of
	wave    []chartOut // the designer's charts (wavecharts.go); nil when there are none

	statics map[string]chartOut // the last static chart of each name
	version int                 // counts static chart versions

	ambScn, waveScn *scenarios.Scenario // the scenario c.amb and c.wave are of
	lastPut         map[string]string   // chart name → key of the last frame given to the writer
	keyBuf          []byte              // a chart key being compared
	scratch         points              // a series being decimated
	respBuf         []byte              // the response chart's inputs, encoded, …
	respLast        []byte              // … and those of the one the page holds
	mapsOf          *scenarios.Result   // the result whose CPISeries ScheduleMaps filled in
	maps            mapScratch          // the heat maps' reused storage (mapframes.go)
	linker          scenarios.Linker    // makes the share links, reusing its compressor
	floorsMemo      [2]floorsMemo       // the Floors views of the last two results asked for
	floorsErr       error               // why the last frame has no Floors chart, when asked for
}

// compute evaluates the newest state the reader posted and puts its frame
// for the writer. A computation the reader cancels as stale is dropped;
// one that finishes is sent even if a newer state waits (see starveAfter).
func (ss *session) compute(ctx context.Context) {
	var cache evalCache
	idle := time.NewTimer(ss.srv.cfg.SessionIdle)
	defer idle.Stop()
	for {
		var w want
		select {
		case <-ctx.Done():
			return
		case <-idle.C:
			ss.release(&cache)
			continue
		case w = <-ss.work.ch:
		}
		// Wait for a compute slot; a newer state that comes meanwhile
		// replaces w. Blocked senders on a channel are served in order, so
		// sessions take turns.
		for waiting := true; waiting; {
			select {
			case <-ctx.Done():
				return
			case ss.srv.adm.slots <- struct{}{}:
				waiting = false
			case w = <-ss.work.ch:
			}
		}
		f, stale, err := ss.run(ctx, w, &cache)
		for stale && ctx.Err() == nil {
			// The reader posts before it cancels, so the newer state is
			// waiting: run it in the slot already held.
			ss.log.Debug("computation superseded", "id", w.id)
			w = <-ss.work.ch
			f, stale, err = ss.run(ctx, w, &cache)
		}
		<-ss.srv.adm.slots
		idle.Reset(ss.srv.cfg.SessionIdle) // idle from the end of the last computation
		switch {
		case ctx.Err() != nil:
			return
		case err != nil:
			ss.errs.put(ss.evalError(err))
		case f != nil:
			cache.put(f)
			if old, ok := ss.frames.swap(f); ok {
				ss.recycle(old)
			}
			ss.framed()
		}
	}
}

// release drops what an idle session holds beyond its last good
// scenarios and their encoded reports: the evaluations (plot series,
// range-Doppler maps) and the evaluator's kept state. The next message
// evaluates the scenarios again.
func (ss *session) release(c *evalCache) {
	if c.res == nil && c.pinRes == nil {
		return
	}
	c.res, c.pinRes = nil, nil
	c.floorsMemo = [2]floorsMemo{}
	if ss.srv.cfg.SessionEvaluator != nil {
		ss.eval = ss.srv.cfg.SessionEvaluator()
	}
	ss.releases.Add(1)
	ss.log.Debug("idle: evaluation buffers released")
}

// run evaluates one state under a context that the reader cancels when
// the state goes stale, and reports whether it did.
func (ss *session) run(ctx context.Context, w want, c *evalCache) (*frame, bool, error) {
	runCtx, cancel := context.WithCancel(ctx)
	defer cancel()
	ss.setRun(w.gen, cancel, false)
	f, err := ss.evaluate(runCtx, w, c)
	stale := runCtx.Err() != nil
	ss.setRun(0, nil, !stale && err == nil)
	return f, stale, err
}

// editError is a failed edit with the id of its message.
type editError struct {
	id  int64
	pin bool // the pinned scenario failed
	err error
}

func (e *editError) Error() string { return e.err.Error() }
func (e *editError) Unwrap() error { return e.err }

// evaluate makes the frame of one state; nil when there is nothing to
// show yet.
func (ss *session) evaluate(ctx context.Context, w want, c *evalCache) (*frame, error) {
	start := time.Now()
	if w.scn.seq != c.scnSeq {
		c.scnSeq = w.scn.seq // taken, good or bad: a bad one is reported once
		sc, err := scenarios.Decode(w.scn.raw)
		if err != nil {
			return nil, &editError{id: w.scn.id, err: err}
		}
		res, err := ss.srv.admitted(ctx, sc, true, ss.eval)
		if errors.Is(err, context.Canceled) {
			c.scnSeq = 0 // evaluate again next time, unless a newer edit comes
		}
		if err != nil {
			return nil, &editError{id: w.scn.id, err: err}
		}
		report, err := json.Marshal(&res.Report)
		if err != nil {
			return nil, &editError{id: w.scn.id, err: fmt.Errorf("encode report: %w", err)}
		}
		link, err := c.linker.Link(sc)
		if err != nil {
			return nil, &editError{id: w.scn.id, err: err}
		}
		c.scn, c.res, c.report, c.link = sc, res, report, []byte(strconv.Quote(link))
	}
	if w.pin.seq != c.pinSeq {
		c.pinSeq = w.pin.seq
		if err := ss.takePin(ctx, w.pin, c); err != nil {
			return nil, err
		}
	}
	if c.res == nil && c.scn != nil { // released while idle: evaluate the last good scenario again
		res, err := ss.srv.admitted(ctx, c.scn, true, ss.eval)
		if err != nil {
			return nil, &editError{id: w.scn.id, err: err}
		}
		c.res = res
	}
	if c.pin != nil && c.pinRes == nil {
		res, err := ss.srv.admitted(ctx, c.pin, true, ss.srv.eval)
		if err != nil {
			return nil, &editError{w.pin.id, true, fmt.Errorf("pinned scenario: %w", err)}
		}
		if res != nil {
			res.DropScene()
		}
		c.pinRes = res
	}
	if c.res == nil {
		return nil, nil // a view or pin before the first good scenario
	}
	if err := ss.ambiguity(ctx, c); err != nil {
		return nil, err
	}
	if err := ss.scheduleMaps(ctx, w, c); err != nil {
		return nil, err
	}
	if err := ss.wavePlots(ctx, c); err != nil {
		return nil, err
	}
	f := ss.newFrame()
	f.id, f.report, f.link, f.reference = w.id, c.report, c.link, nil
	c.chartsOf(f, c.res, c.pinRes, w.view, len(ss.frames.ch) > 0)
	if c.floorsErr != nil {
		ss.log.Debug("floors", "id", w.id, "err", c.floorsErr)
	}
	f.charts = append(f.charts, c.amb...)
	f.charts = append(f.charts, c.wave...)
	if c.pin != nil {
		f.reference = c.pinRept
	}
	f.computeMS = math.Round(float64(time.Since(start).Microseconds())/10) / 100
	return f, nil
}

// newFrame returns a frame the writer has sent, to be filled again, or a
// new one.
func (ss *session) newFrame() *frame {
	select {
	case f := <-ss.free:
		return f
	default:
		return &frame{}
	}
}

// recycle hands a frame that will not be sent again back to compute.
func (ss *session) recycle(f *frame) {
	select {
	case ss.free <- f:
	default:
	}
}

// scheduleMaps simulates the CPI maps of the last good scenario's PRF
// schedule when the page shows them and its result lacks them, within the
// memory the scenario's cost estimate reserves for them.
func (ss *session) scheduleMaps(ctx context.Context, w want, c *evalCache) error {
	if !w.view.cpiMaps || c.scn == nil || c.scn.Radar.Schedule == nil || c.res == nil || c.mapsOf == c.res {
		return nil
	}
	res := c.res
	_, err := ss.srv.admitted(ctx, c.scn, true, func(ctx context.Context, s *scenarios.Scenario) (*scenarios.Result, error) {
		return res, scenarios.ScheduleMaps(ctx, s, res)
	})
	if err != nil {
		return &editError{id: w.scn.id, err: err}
	}
	c.mapsOf = res
	return nil
}

// settle gives each static chart a key that names its data: the previous
// key when the option is byte for byte the same, a new one otherwise.
func (c *evalCache) settle(cs []chartOut) []chartOut {
	if c.statics == nil {
		c.statics = map[string]chartOut{}
	}
	for i, ch := range cs {
		if !ch.static {
			continue
		}
		if last, ok := c.statics[ch.name]; ok && bytes.Equal(last.option, ch.option) {
			cs[i].key = last.key
			continue
		}
		c.version++
		cs[i].key += "#" + strconv.Itoa(c.version)
		c.statics[ch.name] = cs[i]
	}
	return cs
}

// ambiguity finds the ambiguity surface of the last good scenario's pulse
// when its waveform or sample rate changed, from the server's cache or by
// computing it. A surface that cannot be computed is logged and left
// out; only cancellation is an error.
func (ss *session) ambiguity(ctx context.Context, c *evalCache) error {
	if c.scn == c.ambScn {
		return nil
	}
	w, err := json.Marshal(c.scn.Waveform)
	if err != nil {
		return err
	}
	key := string(w) + "@" + strconv.FormatFloat(c.scn.Radar.SampleRateHz, 'g', -1, 64)
	if key == c.ambKey {
		c.ambScn = c.scn
		return nil
	}
	ch, ok := ss.srv.ambs.get(key)
	if !ok {
		// The surface has the evaluation's deadline; past it, it is left
		// out rather than holding the frame.
		actx, cancel := context.WithTimeout(ctx, ss.srv.cfg.EvalTimeout)
		a, err := scenarios.Ambiguity(actx, c.scn, ambiguityCols, ambiguityRows)
		cancel()
		switch {
		case ctx.Err() != nil:
			return ctx.Err()
		case err != nil:
			ss.log.Warn("ambiguity surface", "err", err)
			ch = nil
		default:
			v := ss.srv.ambs.version()
			ch = []chartOut{ambiguityChart(a, v), ambiguityCutsChart(a, v)}
		}
		ss.srv.ambs.put(key, ch)
	}
	c.amb, c.ambKey, c.ambScn = ch, key, c.scn
	return nil
}

// chartCache keeps the last few ambiguity charts (surface and cuts) by waveform, shared by
// the sessions: tabs and demos share waveforms, and a surface costs more
// than a frame. Entries are never changed once stored.
type chartCache struct {
	mu    sync.Mutex
	byKey map[string][]chartOut
	order []string // oldest first
	seq   int
}

const chartCacheSize = 32

func (cc *chartCache) get(key string) ([]chartOut, bool) {
	cc.mu.Lock()
	defer cc.mu.Unlock()
	ch, ok := cc.byKey[key]
	return ch, ok
}

func (cc *chartCache) put(key string, ch []chartOut) {
	cc.mu.Lock()
	defer cc.mu.Unlock()
	if cc.byKey == nil {
		cc.byKey = map[string][]chartOut{}
	}
	if _, ok := cc.byKey[key]; !ok {
		cc.order = append(cc.order, key)
	}
	cc.byKey[key] = ch
	if len(cc.order) > chartCacheSize {
		delete(cc.byKey, cc.order[0])
		cc.order = cc.order[1:]
	}
}

// version numbers the charts made, so that keys stay unique.
func (cc *chartCache) version() int {
	cc.mu.Lock()
	defer cc.mu.Unlock()
	cc.seq++
	return cc.seq
}

// takePin decodes and evaluates a new pin, or unpins.
func (ss *session) takePin(ctx context.Context, p edit, c *evalCache) error {
	if p.raw == nil {
		c.pin, c.pinRes, c.pinRept = nil, nil, nil
		return nil
	}
	sc, err := scenarios.Decode(p.raw)
	if err != nil {
		return &editError{p.id, true, fmt.Errorf("pinned scenario: %w", err)}
	}
	res, err := ss.srv.admitted(ctx, sc, true, ss.srv.eval)
	if errors.Is(err, context.Canceled) {
		c.pinSeq = 0
	}
	if err != nil {
		return &editError{p.id, true, fmt.Errorf("pinned scenario: %w", err)}
	}
	if res != nil {
		res.DropScene() // the Floors tab reads the edited scene, never the pin
	}
	report, err := json.Marshal(&res.Report)
	if err != nil {
		return &editError{p.id, true, fmt.Errorf("encode pinned report: %w", err)}
	}
	c.pin, c.pinRes, c.pinRept = sc, res, report
	return nil
}

// evalError is the message for an edit that failed. Faults of the
// scenario go to the page as they are; internal ones are logged and
// reported briefly.
func (ss *session) evalError(err error) *errorMsg {
	var id int64
	var ee *editError
	if errors.As(err, &ee) {
		id = ee.id
	}
	var te errEvalTimeout
	var se *statusError
	if errors.Is(err, scenarios.ErrInvalid) || errors.Is(err, scenarios.ErrTooLarge) || errors.Is(err, scenarios.ErrTooCostly) ||
		errors.As(err, &te) || errors.As(err, &se) {
		return rejection(id, err)
	}
	ss.log.Error("evaluate", "id", id, "err", err)
	return rejection(id, errors.New("internal error while evaluating the scenario"))
}

// encode renders a frame for a page that holds the chart structures in
// sent: a chart whose structure key is unchanged gets a data-only merge.
// The bytes are assembled by hand around pieces encoded earlier, in the
// shape of frameMsg, so that the plot data is not scanned again.
func (f *frame) encode(sent map[string]string) []byte {
	return f.appendTo(nil, sent)
}

// appendTo is encode appending to b.
func (f *frame) appendTo(b []byte, sent map[string]string) []byte {
	// The size of what is written below: a chart the page holds is left
	// out, one of the structure it holds is sent as its data alone.
	size := len(f.report) + len(f.reference) + len(f.link) + 128
	for _, c := range f.charts {
		held := sent[c.name] == c.key
		if c.static && held {
			continue
		}
		size += len(c.name) + 64
		if !held {
			size += len(c.option)
			continue
		}
		for _, d := range c.data {
			size += len(d.id) + len(d.field) + len(d.data) + 32
		}
	}
	b = slices.Grow(b, size)
	b = append(b, `{"type":"frame","id":`...)
	b = strconv.AppendInt(b, f.id, 10)
	b = append(b, `,"report":`...)
	b = append(b, f.report...)
	b = append(b, `,"link":`...)
	b = append(b, f.link...)
	b = append(b, `,"charts":{`...)
	first := true
	for _, c := range f.charts {
		if c.static && sent[c.name] == c.key {
			continue // the page holds this very chart
		}
		if !first {
			b = append(b, ',')
		}
		first = false
		b = strconv.AppendQuote(b, c.name)
		if sent[c.name] == c.key {
			b = append(b, `:{"replace":false,"option":`...)
			b = c.appendMerge(b)
		} else {
			b = append(b, `:{"replace":true,"option":`...)
			b = append(b, c.option...)
		}
		b = append(b, '}')
	}
	b = append(b, '}')
	if f.reference != nil {
		b = append(b, `,"reference":`...)
		b = append(b, f.reference...)
	}
	b = append(b, `,"compute_ms":`...)
	b = strconv.AppendFloat(b, f.computeMS, 'f', -1, 64)
	return append(b, '}')
}

// writeLoop is the session's only writer. It sends the newest frame and
// error, pings, and on exit a close frame.
func (ss *session) writeLoop(ctx context.Context) {
	ticker := time.NewTicker(pingPeriod)
	defer ticker.Stop()
	timeout := ss.srv.cfg.SessionTimeout
	idleCheck := time.NewTicker(min(timeout/4, time.Minute))
	defer idleCheck.Stop()
	sent := map[string]string{} // chart name → structure key the page holds
	lastFrame := int64(math.MinInt64)
	for {
		select {
		case <-ctx.Done():
			code, text := websocket.CloseNormalClosure, ""
			switch cause := context.Cause(ctx); {
			case ss.srv.ctx.Err() != nil:
				code, text = websocket.CloseGoingAway, "server shutting down"
			case errors.Is(cause, errEvicted), errors.Is(cause, errIdleClosed):
				code, text = websocket.CloseTryAgainLater, cause.Error()
			}
			ss.conn.WriteControl(websocket.CloseMessage, websocket.FormatCloseMessage(code, text), time.Now().Add(writeWait))
			return
		case f := <-ss.frames.ch:
			ss.out = f.appendTo(ss.out[:0], sent)
			if err := ss.writeBytes(ss.out); err != nil {
				return
			}
			for _, c := range f.charts {
				sent[c.name] = c.key
			}
			lastFrame = f.id
			if ss.log.Enabled(ctx, slog.LevelDebug) {
				ss.log.Debug("frame", "id", f.id, "compute_ms", f.computeMS)
			}
			ss.recycle(f)
		case e := <-ss.errs.ch:
			if e.ID < lastFrame {
				continue // a newer edit was shown already
			}
			if err := ss.write(e); err != nil {
				return
			}
		case now := <-idleCheck.C:
			if ss.slot.idle(now) >= timeout {
				ss.log.Info("idle session closed", "idle", ss.slot.idle(now).Round(time.Second))
				ss.slot.cancel(errIdleClosed)
			}
		case <-ticker.C:
			ss.conn.SetWriteDeadline(time.Now().Add(writeWait))
			if err := ss.conn.WriteMessage(websocket.PingMessage, nil); err != nil {
				return
			}
		}
	}
}

// write sends one error message.
func (ss *session) write(m *errorMsg) error {
	data, err := json.Marshal(m)
	if err != nil {
		panic("server: error message not encodable: " + err.Error()) // strings only
	}
	return ss.writeBytes(data)
}

// writeBytes sends one text message under a write deadline.
func (ss *session) writeBytes(data []byte) error {
	ss.conn.SetWriteDeadline(time.Now().Add(writeWait))
	return ss.conn.WriteMessage(websocket.TextMessage, data)
}
