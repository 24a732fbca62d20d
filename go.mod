module reprise

go 1.26.8

require (
	github.com/blevesearch/segment v0.9.1 // indirect
	github.com/cespare/xxhash/v2 v2.3.0 // indirect
	github.com/rivo/uniseg v0.4.7 // indirect
	github.com/spf13/pflag v1.1.0 // indirect
	golang.org/x/text v0.44.0 // indirect
	pgregory.net/rapid v1.3.0 // indirect
)
