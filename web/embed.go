package web

import "embed"

// Assets are the files copied into the site's web/ directory.
//
//go:embed app.css icon.svg icon-192.png icon-512.png start.js worker.js
var Assets embed.FS

// Names lists Assets in a fixed order.
var Names = []string{"app.css", "icon.svg", "icon-192.png", "icon-512.png", "start.js", "worker.js"}
