// Websocket protocol of /ws, mirrored from server/protocol.go (see
// DEVELOPERS.md, "Websocket protocol"). JSON text messages, each with a
// `type`. Change both files together.

// Client → server message types.
export const MsgScenario = 'scenario'; // {id, scenario}: a new edit, latest wins
export const MsgView = 'view'; // {id, range_m: [a, b] | null, width_px, map_px, cpi_maps}
export const MsgPin = 'pin'; // {id, scenario | null}: compare against a pinned scenario
export const MsgCell = 'cell'; // {id, cell: {range_m, range_rate_mps} | null}: cuts through the range–Doppler map
export const MsgFloors = 'floors'; // {id, floors: {target, row?} | null}: the Floors tab shows a target's dynamic-range view, or not

// Server → client message types.
export const MsgFrame = 'frame'; // {id, report, link, charts, reference?, compute_ms}
export const MsgError = 'error'; // {id, error, fields: [{path, message}]}

// Chart names that may appear in a frame's `charts` map.
export const Charts = ['profile', 'echo', 'response', 'ambiguity', 'ambcuts', 'rdmap', 'rdcuts'];

// Series ids of the profile chart.
export const SeriesProfile = 'profile';
export const SeriesClean = 'clean';
export const SeriesThreshold = 'threshold';
export const SeriesNoise = 'noise';
export const SeriesReference = 'reference';
export const SeriesMarkers = 'markers';

// Target statuses of the report format.
export const Statuses = ['detected', 'masked', 'too_weak', 'eclipsed', 'folded', 'out_of_window', 'clutter', 'below_horizon'];

export function scenarioMsg(id, scenario) {
  return JSON.stringify({ type: MsgScenario, id, scenario });
}

export function viewMsg(id, rangeM, widthPx, mapPx, cpiMaps = false) {
  return JSON.stringify({ type: MsgView, id, range_m: rangeM, width_px: Math.round(widthPx), map_px: Math.round(mapPx || 0), cpi_maps: !!cpiMaps });
}

export function pinMsg(id, scenario) {
  return JSON.stringify({ type: MsgPin, id, scenario });
}

export function cellMsg(id, cell) {
  return JSON.stringify({ type: MsgCell, id, cell });
}

export function floorsMsg(id, floors) {
  return JSON.stringify({ type: MsgFloors, id, floors });
}
