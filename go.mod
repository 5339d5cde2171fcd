module cureslab

go 1.26.8

require (
	github.com/BurntSushi/toml v1.6.0 // indirect
	github.com/spf13/pflag v1.1.0 // indirect
	gonum.org/v1/gonum v0.17.0 // indirect
)
