# Benchmarks are scripts that print ratios, not tests: never collect them.
collect_ignore_glob = ["bench_*.py"]
