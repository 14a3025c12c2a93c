"""Stage 1, design input: the design file (TOML) read and validated into frozen model
values, the schema of its keys, the material and tube catalogues, the shipped templates.

Imports: the standard library, numpy and :mod:`plumbrod.errors` only; nothing solved here.
"""
