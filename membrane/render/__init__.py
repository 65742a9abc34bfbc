"""Pictures of a drum's modes: stills, 3D animations and a printable handout.

Modules (import the one you need; none loads matplotlib or pyvista at import):

- :mod:`membrane.render.shape`: a mode's displacement on a polar grid, captions.
- :mod:`membrane.render.stills`: nodal diagram, mode grid, ratio chart (matplotlib).
- :mod:`membrane.render.animate`: 3D GIF/MP4/PNG of one mode (pyvista, off screen).
- :mod:`membrane.render.handout`: the workshop handout PDF (matplotlib PdfPages).
- :mod:`membrane.render.spectrum`: the spectrum picture of a tap recording (``listen --plot``).
- :mod:`membrane.render.labels`: labels placed beside their points without overlapping.
"""
