# Convenience targets; each is one documented go command (see DEVELOPERS.md).

.PHONY: test bench bench-engine fuzz profile

test:
	go test ./...

# Every benchmark once, with allocations (a few minutes on two cores).
bench:
	go test -run '^$$' -bench . -benchmem ./...

# The engine benchmarks six times, ready for benchstat.
bench-engine:
	go test -run '^$$' -bench 'Engine|WriteCatalogue' -benchmem -count 6 ./popsynth

# Bounded fuzzing of the three parsers, as CI runs it.
fuzz:
	bash .ci/fuzz

# CPU profiles of 10 million single stars and 10 million binaries.
profile:
	go build -o /tmp/corefall ./cmd/corefall
	/tmp/corefall run --quiet --set systems=10000000 -o /tmp/single.parquet --cpuprofile single.prof
	/tmp/corefall run --quiet --set systems=10000000 --set binary_fraction=1 -o /tmp/binary.parquet --cpuprofile binary.prof
	go tool pprof -top -nodecount 25 /tmp/corefall single.prof
	go tool pprof -top -nodecount 25 /tmp/corefall binary.prof
