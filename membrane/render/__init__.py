"""Pictures of a drum's modes: stills, 3D animations and a printable handout.

Modules (import the one you need; none loads matplotlib or pyvista at import):

- :mod:`membrane.render.shape`: a mode's displacement on a polar grid, captions.
- :mod:`membrane.render.stills`: nodal diagram, mode grid, ratio chart (matplotlib).
- :mod:`membrane.render.animate`: 3D GIF/MP4/PNG of one mode (pyvista, off screen).
- :mod:`membrane.render.handout`: the workshop handout PDF (matplotlib PdfPages).
"""
