"""Stage 7, outputs: text and JSON report, per-pose tables, PNG figures, DXF drawings
and plate cut profiles, atomic file writing, the cautions text.  matplotlib and ezdxf
are imported inside the functions that draw.

Imports: earlier stages only.
"""
