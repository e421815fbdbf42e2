module github.com/pulsewright/pulsewright

go 1.26.0

require (
	github.com/chromedp/cdproto v0.159.0
	github.com/chromedp/chromedp v0.23.0
	github.com/go-chi/chi/v5 v5.5.0
	github.com/go-echarts/go-echarts/v2 v2.6.7
	github.com/gorilla/websocket v1.5.3
	golang.org/x/sys v0.50.0
	gonum.org/v1/gonum v0.17.0
	gopkg.in/yaml.v3 v3.0.1
)

require (
	github.com/go-json-experiment/json v0.0.0-20260213210345-44df1a37e875 // indirect
	github.com/kr/text v0.2.0 // indirect
)
