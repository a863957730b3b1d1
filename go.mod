module calcdoc

go 1.26.8

require (
	github.com/fsnotify/fsnotify v1.10.1 // indirect
	github.com/yuin/goldmark v1.8.7 // indirect
	go.yaml.in/yaml/v3 v3.0.6 // indirect
	golang.org/x/sys v0.13.0 // indirect
	gonum.org/v1/gonum v0.17.0 // indirect
)
