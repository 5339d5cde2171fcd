# cureslab — common tasks.
# `make ci` runs exactly what CI runs: .ci/run (go vet, the gofmt check,
# `go test ./...` as in the README, and the browser check of the reports).
# `make test` is the test suite alone.
GO ?= go
FUZZTIME ?= 10m

.PHONY: ci build test vet bench bench-scaling bench-process demo fuzz e2e clean

ci:
	bash .ci/run

build:
	$(GO) build ./...

test:
	$(GO) test ./...

vet:
	$(GO) vet ./...
	$(GO) vet -tags purego ./physics/...
	@test -z "$$(gofmt -l . | grep -v '^testdata/')" || (gofmt -l .; exit 1)

# Speed figures (README "Performance"; dated record in DEVELOPERS.md,
# "Measurement journal").
bench:
	$(GO) test -run '^$$' -bench . -benchmem -count 5 ./solver/ ./cases/ ./cases/sweep/

# Sweep scaling from -j 1 to -j 2: eight alternating pairs of 1000-run
# sweeps of the coupled bench case, one ratio per pair (shared machines are
# noisy; read the median).
bench-scaling:
	$(GO) test -c -o sweep.test ./cases/sweep
	cd cases/sweep && for k in 1 2 3 4 5 6 7 8; do \
		a=$$(../../sweep.test -test.run '^$$' -test.bench 'SweepBench1000/j1$$' -test.benchtime 1x | awk '/runs\/s/{print $$5}'); \
		b=$$(../../sweep.test -test.run '^$$' -test.bench 'SweepBench1000/j2$$' -test.benchtime 1x | awk '/runs\/s/{print $$5}'); \
		echo "j1 $$a runs/s  j2 $$b runs/s  ratio $$(awk "BEGIN{printf \"%.2f\", $$b/$$a}")"; \
	done
	rm -f sweep.test

# Whole-process timings (hello world, cureslab help, run --no-report of the
# coupled bench case), alternated, N rounds: minimum and median of each.
bench-process:
	bash testdata/bench/time-process.sh $(N)

demo:
	$(GO) run ./cmd/cureslab demo -o cureslab-demo

# Long fuzzing, one target at a time (not part of CI, which runs the seeds).
fuzz:
	$(GO) test ./cases/units -run '^$$' -fuzz '^FuzzParse$$' -fuzztime $(FUZZTIME)
	for t in FuzzParse FuzzParseResolved FuzzCaseValues FuzzScheduleCSV FuzzScanCSV FuzzUnitsRoundTrip FuzzParseScan FuzzFieldsRoundTrip; do \
		$(GO) test ./cases -run '^$$' -fuzz "^$$t\$$" -fuzztime $(FUZZTIME) -fuzzminimizetime 10s -parallel 1 || exit 1; \
	done
	$(GO) test ./cases/calibrate -run '^$$' -fuzz '^FuzzReadLog$$' -fuzztime $(FUZZTIME) -fuzzminimizetime 10s -parallel 1

clean:
	rm -rf cureslab-demo

# The HTML reports rendered in headless Chromium (installs Debian's chromium
# as root when missing). CI runs it from .ci/run.
e2e:
	bash .ci/e2e.sh
