"""Stage 6, verdict: each figure against its limit (the checks, with fixed ids) and the
:class:`~plumbrod.verdict.findings.Findings` that every output is built from.

Imports: earlier stages only.
"""
