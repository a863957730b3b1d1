module calcdoc

go 1.26.8

require (
	github.com/fsnotify/fsnotify v1.10.1
	github.com/yuin/goldmark v1.8.7
	go.yaml.in/yaml/v3 v3.0.6
	golang.org/x/net v0.62.0
	golang.org/x/text v0.44.0
	gonum.org/v1/gonum v0.17.0
)

require golang.org/x/sys v0.49.0
