# cureslab — common tasks. `make test` is what CI runs (.ci/run).
GO ?= go
FUZZTIME ?= 10m

.PHONY: build test vet bench demo fuzz e2e clean

build:
	$(GO) build ./...

test:
	$(GO) test ./...

vet:
	$(GO) vet ./...
	@test -z "$$(gofmt -l . | grep -v '^testdata/')" || (gofmt -l .; exit 1)

# Speed figures for the README (see "Performance").
bench:
	$(GO) test -run '^$$' -bench . -benchmem -count 5 ./solver/ ./cases/

demo:
	$(GO) run ./cmd/cureslab demo -o cureslab-demo

# Long fuzzing, one target at a time (not part of CI, which runs the seeds).
fuzz:
	$(GO) test ./cases/units -run '^$$' -fuzz '^FuzzParse$$' -fuzztime $(FUZZTIME)
	for t in FuzzParseResolved FuzzCaseValues FuzzScheduleCSV FuzzScanCSV FuzzUnitsRoundTrip FuzzParseScan FuzzFieldsRoundTrip; do \
		$(GO) test ./cases -run '^$$' -fuzz "^$$t\$$" -fuzztime $(FUZZTIME) -fuzzminimizetime 10s -parallel 1 || exit 1; \
	done

clean:
	rm -rf cureslab-demo

# The HTML reports rendered in headless Chromium (installs Debian's chromium
# as root when missing). CI runs it from .ci/run.
e2e:
	bash .ci/e2e.sh
