#!/usr/bin/env bash
# The comparison suite: numag beside the exact reference on the shared problems and scaled families.
# Installs numag with the exact reference (sympy) and plotting (matplotlib), then writes
# benchmarks/results/comparison.{csv,json,png}. About 10 minutes on 2 cores.
# Usage: scripts/comparison_suite.sh [--quick] [--time-limit S]
set -euo pipefail
cd "$(dirname "$0")/.."
python -m pip install -q '.[exact,plot]'
python benchmarks/bench_compare.py --output benchmarks/results "$@"
