module amplink

go 1.26.8

require (
	github.com/hajimehoshi/go-mp3 v0.3.4
	github.com/maxence-charriere/go-app/v9 v9.8.0
	gonum.org/v1/gonum v0.17.0
)

require github.com/google/uuid v1.3.0 // indirect
