"""Stage 8, revise: tools that propose a changed design file (tube sizing), written
as edited copies of the user's text.

Imports: earlier stages only.
"""
