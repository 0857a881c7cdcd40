"""Benchmarks behind `wakerank bench` (one module per subject)."""
