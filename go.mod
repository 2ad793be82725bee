module github.com/forkcast/forkcast

go 1.26.8

require (
	github.com/alecthomas/participle/v2 v2.1.4
	github.com/flopp/go-findfont v0.1.0
	github.com/fogleman/gg v1.3.0
	github.com/goccy/go-graphviz v0.2.10
	github.com/golang/freetype v0.0.0-20170609003504-e2365dfdc4a0
	github.com/shopspring/decimal v1.6.0
	github.com/urfave/cli/v2 v2.27.7
	github.com/xrash/smetrics v0.0.0-20240521201337-686a1a2994c1
	golang.org/x/image v0.25.0
)

require (
	github.com/cpuguy83/go-md2man/v2 v2.0.7 // indirect
	github.com/disintegration/imaging v1.6.2 // indirect
	github.com/russross/blackfriday/v2 v2.1.0 // indirect
	github.com/tetratelabs/wazero v1.10.1 // indirect
	golang.org/x/text v0.23.0 // indirect
)
