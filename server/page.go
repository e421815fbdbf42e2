package server

import (
	"encoding/json"
	"fmt"
	"html/template"
	"io/fs"
	"math"
	"regexp"
	"strings"
	"sync"

	"github.com/pulsewright/pulsewright/web"
)

// Self-contained pages (the customer report, the sweep page) carry the
// vendored ECharts inline, so they open from a file with no network.

// echartsPath is the vendored ECharts ES module inside web.FS.
const echartsPath = "vendor/echarts/echarts.esm.min.js"

var (
	echartsOnce sync.Once
	echartsJS   string
	echartsErr  error
)

// exportClause is the one export statement that ends the ES module build.
var exportClause = regexp.MustCompile(`export\{([^}]*)\};?\s*$`)

// inlineECharts returns the vendored ECharts module rewritten to run
// inline in a <script type="module">: its closing export statement
// becomes "const echarts={…}", so code appended to the same script sees
// the namespace as echarts. The rewrite is checked, never guessed: the
// build must end in exactly one export clause of "local as name" pairs.
func inlineECharts() (string, error) {
	echartsOnce.Do(func() {
		b, err := fs.ReadFile(web.FS(), echartsPath)
		if err != nil {
			echartsErr = fmt.Errorf("read vendored echarts: %w", err)
			return
		}
		src := string(b)
		if strings.Contains(strings.ToLower(src), "</script") {
			echartsErr = fmt.Errorf("vendored echarts contains </script and cannot be inlined")
			return
		}
		loc := exportClause.FindStringSubmatchIndex(src)
		if loc == nil || strings.Count(src, "export{") != 1 {
			echartsErr = fmt.Errorf("vendored echarts: no single closing export clause")
			return
		}
		var pairs []string
		for _, item := range strings.Split(src[loc[2]:loc[3]], ",") {
			local, name, ok := strings.Cut(strings.TrimSpace(item), " as ")
			if !ok {
				local, name = strings.TrimSpace(item), strings.TrimSpace(item)
			}
			pairs = append(pairs, name+":"+local)
		}
		echartsJS = src[:loc[0]] + "const echarts={" + strings.Join(pairs, ",") + "};\n"
	})
	return echartsJS, echartsErr
}

// pageChart is one chart of a page: a div and the ECharts option for it.
type pageChart struct {
	ID     string
	Height int // px
	Option map[string]any
}

// chartScript returns the module that draws the charts: ECharts inline,
// then one init and setOption per chart. The options are JSON, which
// json.Marshal escapes for HTML (<, >, &), so they are safe in a script
// element. When every chart has drawn, body gets data-charts="ready".
func chartScript(cs []pageChart) (template.JS, error) {
	lib, err := inlineECharts()
	if err != nil {
		return "", err
	}
	opts := make(map[string]any, len(cs))
	for _, c := range cs {
		opts[c.ID] = c.Option
	}
	data, err := json.Marshal(opts)
	if err != nil {
		return "", fmt.Errorf("encode chart options: %w", err)
	}
	return template.JS(lib + `
window.echarts = echarts;
const options = ` + string(data) + `;
for (const [id, option] of Object.entries(options)) {
  const chart = echarts.init(document.getElementById(id), null, {renderer: 'canvas'});
  chart.setOption(option, {notMerge: true});
  window.addEventListener('resize', () => chart.resize());
}
document.body.dataset.charts = 'ready';
`), nil
}

// Status colours and symbols of the target markers: our own palette.
var statusColour = map[string]string{
	"detected":      "#1b7f3b",
	"masked":        "#c2410c",
	"too_weak":      "#6b7280",
	"eclipsed":      "#7c3aed",
	"folded":        "#a16207",
	"out_of_window": "#0e7490",
	"clutter":       "#8b5e3c",
}

// minMaxPairs reduces y[k] at x0 + k·dx to at most 2·buckets points, keeping
// the minimum and the maximum of each bucket in their order, so no peak is
// lost. Values are floored at floor (NaN and −Inf cannot be encoded).
func minMaxPairs(x0, dx float64, y []float64, buckets int, floor float64) [][2]float64 {
	clamp := func(v float64) float64 {
		if math.IsNaN(v) || v < floor {
			return floor
		}
		if math.IsInf(v, 1) {
			return 400
		}
		return v
	}
	n := len(y)
	if n <= 2*buckets {
		out := make([][2]float64, n)
		for k, v := range y {
			out[k] = [2]float64{x0 + float64(k)*dx, clamp(v)}
		}
		return out
	}
	out := make([][2]float64, 0, 2*buckets)
	for b := range buckets {
		lo, hi := b*n/buckets, (b+1)*n/buckets
		kmin, kmax := lo, lo
		for k := lo; k < hi; k++ {
			if y[k] < y[kmin] {
				kmin = k
			}
			if y[k] > y[kmax] {
				kmax = k
			}
		}
		first, second := min(kmin, kmax), max(kmin, kmax)
		out = append(out, [2]float64{x0 + float64(first)*dx, clamp(y[first])})
		if second != first {
			out = append(out, [2]float64{x0 + float64(second)*dx, clamp(y[second])})
		}
	}
	return out
}

// round4 keeps about 4 decimals of a plotted value: far below a pixel,
// and it keeps the page small.
func round4(v float64) float64 { return math.Round(v*1e4) / 1e4 }

func roundPairs(ps [][2]float64) [][2]float64 {
	for i := range ps {
		ps[i] = [2]float64{round4(ps[i][0]), round4(ps[i][1])}
	}
	return ps
}

// pageStyle is the shared CSS of the self-contained pages.
const pageStyle = `
:root { --ink:#1f2933; --muted:#5f6b7a; --rule:#d8dee6; --band:#f4f6f9; --accent:#0b5394; }
* { box-sizing: border-box; }
body { margin: 0; font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: var(--ink); background: #fff; }
main { max-width: 1100px; margin: 0 auto; padding: 24px 28px 48px; }
header { border-bottom: 3px solid var(--accent); margin-bottom: 20px; padding-bottom: 10px; }
header .brand { color: var(--accent); font-weight: 600; letter-spacing: .04em; text-transform: uppercase; font-size: 12px; }
h1 { font-size: 26px; margin: 4px 0 0; }
h2 { font-size: 18px; margin: 28px 0 8px; border-bottom: 1px solid var(--rule); padding-bottom: 4px; }
p.notes { color: var(--muted); margin: 8px 0 0; }
table { border-collapse: collapse; width: 100%; margin: 6px 0; }
th, td { text-align: left; padding: 5px 8px; border-bottom: 1px solid var(--rule); vertical-align: top; }
th { background: var(--band); font-weight: 600; font-size: 13px; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.grid2 { display: grid; grid-template-columns: 1fr 1fr; gap: 0 28px; }
.kv th { width: 42%; background: none; font-weight: 500; color: var(--muted); }
.chart { width: 100%; border: 1px solid var(--rule); border-radius: 4px; margin: 8px 0; }
.status { display: inline-block; padding: 1px 8px; border-radius: 10px; color: #fff; font-size: 12px; font-weight: 600; white-space: nowrap; }
.link { word-break: break-all; font-family: ui-monospace, Menlo, Consolas, monospace; font-size: 12px; background: var(--band); padding: 8px; border-radius: 4px; }
.caution { border-left: 4px solid #b45309; background: #fff7ed; padding: 10px 14px; margin-top: 28px; }
.warn { color: #b45309; }
footer { margin-top: 28px; color: var(--muted); font-size: 12px; }
.scenario-notes p { white-space: pre-line; margin: 6px 0; }
@media print { .chart { break-inside: avoid; } }
`

// caution is the RF caution note, the same as the README's.
const caution = `Pulsewright is a simulator; it radiates nothing. The radars it models do: high-power RF can injure people (RF exposure limits apply near antennas) and transmissions are licensed. Before you build or operate a transmitter, follow your local regulations on RF exposure and spectrum use, and the practice of licensed professionals. Figures from this tool are engineering estimates, not certification evidence.`
