package server

import (
	"encoding/json"

	"github.com/pulsewright/pulsewright/scenarios"
)

// The websocket protocol of /ws (DEVELOPERS.md, "Websocket protocol"):
// JSON text messages with a type. Mirrored in web/static/js/protocol.js;
// change both together.

// Client → server message types.
const (
	MsgScenario = "scenario" // {id, scenario}: a new edit, latest wins
	MsgView     = "view"     // {id, range_m: [a, b] | null, width_px, map_px?, cpi_maps?}
	MsgPin      = "pin"      // {id, scenario | null}: compare against a pinned scenario
	MsgCell     = "cell"     // {id, cell: {range_m, range_rate_mps} | null}: cuts through the range–Doppler map
	MsgFloors   = "floors"   // {id, floors: {target, row?} | null}: the Floors tab shows (a target's dynamic-range view) or not
)

// Server → client message types.
const (
	MsgFrame = "frame" // {id, report, link, charts, reference?, compute_ms}
	MsgError = "error" // {id, error, fields}
)

// Plot widths accepted from a view message, px.
const (
	minWidthPx     = 100
	maxWidthPx     = 8192
	defaultWidthPx = 1200
)

// inMsg is any client message; which fields apply depends on Type.
type inMsg struct {
	Type     string          `json:"type"`
	ID       int64           `json:"id"`
	Scenario json.RawMessage `json:"scenario"`
	RangeM   *[2]float64     `json:"range_m"`
	WidthPx  int             `json:"width_px"`
	MapPx    int             `json:"map_px"`
	CPIMaps  bool            `json:"cpi_maps"` // view: send the maps of a PRF schedule's CPIs
	Cell     *cellMsg        `json:"cell"`
	Floors   *floorsMsg      `json:"floors"`
}

// floorsMsg asks for the dynamic-range view of a target: "" for the
// strongest; row, for a pulse train, the target whose map row to follow
// ("" lets the engine choose).
type floorsMsg struct {
	Target string `json:"target"`
	Row    string `json:"row"`
}

// cellMsg is a place on the range–Doppler map.
type cellMsg struct {
	RangeM       float64 `json:"range_m"`
	RangeRateMPS float64 `json:"range_rate_mps"`
}

// chartMsg is one entry of a frame's charts map: the page calls
// chart.setOption(option, {notMerge: replace}).
type chartMsg struct {
	Replace bool `json:"replace"`
	Option  any  `json:"option"`
}

// frameMsg is the result of the newest edit. frame.encode writes this
// shape by hand around pieces encoded beforehand (the plot data would
// cost twice through encoding/json); the tests decode every frame into
// it, refusing unknown fields.
type frameMsg struct {
	Type      string              `json:"type"` // MsgFrame
	ID        int64               `json:"id"`
	Report    *scenarios.Report   `json:"report"`
	Link      string              `json:"link"`
	Charts    map[string]chartMsg `json:"charts"`
	Reference *scenarios.Report   `json:"reference,omitempty"`
	ComputeMS float64             `json:"compute_ms"`
}

// errorMsg rejects an edit; the session keeps its last good scenario.
type errorMsg struct {
	Type   string                 `json:"type"` // MsgError
	ID     int64                  `json:"id"`
	Error  string                 `json:"error"`
	Fields []scenarios.FieldError `json:"fields"`
}
