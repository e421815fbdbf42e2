// Package web holds the workbench page: HTML, CSS, plain ES modules and a
// pinned copy of ECharts, embedded in the binary so that the page works
// with no network. The server mounts FS with http.FileServerFS.
package web

import (
	"embed"
	"io/fs"
)

//go:embed static
var static embed.FS

// FS returns the page's files rooted at the static directory, so that
// "index.html" and "js/main.js" are served from "/" and "/js/main.js".
func FS() fs.FS {
	sub, err := fs.Sub(static, "static")
	if err != nil {
		panic("web: " + err.Error()) // "static" is a valid path, so fs.Sub cannot fail
	}
	return sub
}
