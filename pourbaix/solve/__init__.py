"""Exact geometric solvers: lower envelopes of planes and clipping."""
