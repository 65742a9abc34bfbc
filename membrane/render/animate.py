"""3D pictures of a vibrating head with pyvista, off screen: GIF, MP4 or one PNG.

The head is the solver's mode shape on the polar grid of
:func:`membrane.render.shape.sample`, lifted by ``amplitude`` (a fraction of the
radius: the motion is exaggerated, a real head moves far less) and swung through
one period, cos(2 pi k / frames) for frame k, so the loop closes without a jump.
Colour is the instantaneous displacement on a fixed scale. Rendering needs no
display and no GPU (pyvista's off-screen mode); pyvista, vtk, imageio and Pillow
are imported inside the functions.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .shape import CMAP, mode_caption, physics_words, sample

FORMATS = ("gif", "mp4", "png")
# A 480-pixel picture shows no difference from the stills' finer grid; half the
# triangles render nearly twice as fast in software.
SCENE_GRID = {"radial": 81, "angular": 145}
COLOUR_FLOOR = 0.1  # fraction of the struck head's peak below which a head's colours are not boosted
BODY_DEPTH = 0.45  # drawn depth of a kettle below the head, in radii (a hint, not to scale)


@dataclass(frozen=True)
class View:
    """How the animation looks.

    Attributes
    ----------
    frames : int
        Frames per period (the GIF/MP4 holds exactly this many).
    width, height : int
        Pixels.
    amplitude : float
        Peak displacement drawn, as a fraction of the head's radius.
    elevation, azimuth : float
        Camera angles in degrees: above the head's plane, and around its axis from +x.
    fps : float
        Frames per second of the file.
    """

    frames: int = 48
    width: int = 480
    height: int = 480
    amplitude: float = 0.3
    elevation: float = 36.0
    azimuth: float = -60.0
    fps: float = 24.0


def _quiet_vtk() -> None:
    """Keep vtk's off-screen fallback warning (no X server) off the user's terminal.

    With no display, vtk first tries X, logs a warning, then renders through EGL or
    OSMesa; only errors are worth showing.
    """
    from vtkmodules.vtkCommonCore import vtkLogger

    vtkLogger.SetStderrVerbosity(vtkLogger.VERBOSITY_ERROR)


def _offscreen_plotter(pv, size):
    """An off-screen pyvista Plotter, without pyvista's display probe.

    Creating a Plotter first asks whether the system can show windows (on Linux it runs
    ``xset`` and, failing that, opens a throwaway OpenGL render window) only to decide
    whether to warn about a missing X server. Off screen there is nothing to show, so
    the probe is skipped through pyvista's own switch for it, ALLOW_PLOTTING, set for
    this call only.
    """
    import os

    before = os.environ.get("ALLOW_PLOTTING")
    os.environ["ALLOW_PLOTTING"] = "true"
    try:
        return pv.Plotter(off_screen=True, window_size=size)
    finally:
        if before is None:
            del os.environ["ALLOW_PLOTTING"]
        else:
            os.environ["ALLOW_PLOTTING"] = before


def _depth(drum) -> float:
    """Drawn depth of the body below the rim, in radii (a shell to scale, else a hint)."""
    body = getattr(drum, "body", None)
    if getattr(body, "kind", None) == "shell" and body.depth:
        return float(body.depth / drum.head.radius)
    return BODY_DEPTH


def _body(kind: str, depth: float):
    """A shell's wall or a kettle's bowl below the rim, in radii; None for no body."""
    import pyvista as pv

    theta = np.linspace(0.0, 2.0 * np.pi, 73)
    if kind == "shell":
        tt, zz = np.meshgrid(theta, np.array([0.0, -depth]))
        return pv.StructuredGrid(np.cos(tt), np.sin(tt), zz)
    if kind == "kettle":
        tt, pp = np.meshgrid(theta, np.linspace(0, 0.5 * np.pi, 13))
        return pv.StructuredGrid(np.cos(tt) * np.cos(pp), np.sin(tt) * np.cos(pp),
                                 -1.6 * depth * np.sin(pp))
    return None


class HeadScene:
    """A pyvista scene of one mode, ready to render frames.

    Parameters
    ----------
    modeset : membrane.modes.ModeSet
        Solved modes.
    mode : membrane.modes.Mode
        The mode to draw.
    view : View
        Look and size.
    reference : (int, int)
        Mode the ratio in the title is taken to.
    """

    def __init__(self, modeset, mode, view: View, *, reference=None):
        import pyvista as pv

        _quiet_vtk()
        self.view = view
        p = _offscreen_plotter(pv, (view.width, view.height))
        # vtk's default multisampling costs 3-5x per frame in software rendering
        # (no GPU); the mesh is fine enough that the edges stay clean without it.
        p.disable_anti_aliasing()
        # The only see-through part is the body, one colour: its layers blend alike in any
        # order, so plain alpha blending draws what vtk's order-independent transparency
        # does (measured: within 3/255 per pixel) at three quarters of the time per frame.
        p.renderer.SetUseOIT(False)
        p.set_background("white")
        drum = modeset.drum
        kind = getattr(getattr(drum, "body", None), "kind", "none")
        depth = _depth(drum)
        # (grid, shape, height of its rim): the struck head, and a shell's resonant head below
        self.heads = []
        sides = [(False, 0.0)] + ([(True, -depth)] if mode.resonant_coefficients is not None else [])
        for resonant, z0 in sides:
            field = sample(mode, resonant=resonant, **SCENE_GRID)
            # Mode shapes are outward displacements: outward is down for the resonant
            # head. Drawn and coloured as up (red) / down (blue) for both heads.
            up = -field.w if resonant else field.w
            # Colour: each head on its own scale, so a resonant head that moves less than
            # the struck one still shows its sign in full colour (its height stays true);
            # a head moving under COLOUR_FLOOR of the struck head's peak keeps that scale.
            tint = 1.0 / max(float(np.max(np.abs(up))), COLOUR_FLOOR)
            x, y = field.xy
            grid = pv.StructuredGrid(x, y, z0 + view.amplitude * up)
            grid["displacement"] = tint * up.ravel(order="F")
            p.add_mesh(grid, scalars="displacement", cmap=CMAP, clim=(-1.0, 1.0), show_scalar_bar=False,
                       smooth_shading=False, ambient=0.25, diffuse=0.8)
            rim = np.column_stack([np.cos(field.theta), np.sin(field.theta), np.full_like(field.theta, z0)])
            p.add_mesh(pv.lines_from_points(rim).tube(radius=0.018), color="#303030")
            self.heads.append((grid, up.ravel(order="F"), z0, tint))
        body = _body(kind, depth)
        if body is not None:  # see-through, so the head below the rim stays in sight (and in colour)
            p.add_mesh(body, color="#a0a0a0", opacity=0.12 if kind == "shell" else 0.25, smooth_shading=True)
        el, az = np.radians(view.elevation), np.radians(view.azimuth)
        centre = -0.05 - 0.5 * depth * (len(self.heads) - 1)
        distance = 4.2 + 1.2 * depth * (len(self.heads) - 1)
        p.camera.focal_point = (0.0, 0.0, centre)
        p.camera.position = (distance * np.cos(el) * np.cos(az), distance * np.cos(el) * np.sin(az),
                             centre + distance * np.sin(el))
        p.camera.up = (0.0, 0.0, 1.0)
        p.camera.view_angle = 30.0
        words = physics_words(modeset.physics) if view.width >= 320 else f"{modeset.physics} physics"
        title = mode_caption(modeset, mode, reference=reference) + "\n" + words
        # vtk's font size is in points at its own dpi: measured, a glyph is ~1.3 of it wide;
        # fit the longest title line across the picture.
        longest = max(len(line) for line in title.split("\n"))
        font = max(5, min(int(view.width / (1.3 * longest)), int(view.height / 34)))
        p.add_text(title, position="upper_edge", font_size=font, color="black")
        note = [f"motion exaggerated (peak {view.amplitude:g} x radius)"]
        if len(self.heads) > 1:
            note.append("below: the resonant head; colours per head")
        # as large as the title allows, each line fitting across the picture
        small = font + 2  # vtk shrinks corner text to fit the window: ask for as much as the title
        p.add_text("\n".join(note), position="lower_left", font_size=small, color="#303030")
        self.plotter = p

    def frame(self, phase: float) -> np.ndarray:
        """RGB image (height, width, 3) with the head(s) at cos(phase) of the peak."""
        c = np.cos(phase)
        for grid, w, z0, tint in self.heads:
            points = grid.points
            points[:, 2] = z0 + self.view.amplitude * c * w
            grid.points = points
            grid["displacement"] = tint * c * w
        self.plotter.render()
        return np.asarray(self.plotter.screenshot(return_img=True))[..., :3]

    def frames(self, progress=None, *, reuse: bool = False):
        """All frames of one period, in order; ``progress(k, total)`` after each.

        A standing wave at phase 2 pi k / total and at 2 pi (total - k) / total has the
        same cos, so the same picture: with ``reuse`` the second half of the period
        repeats the first half's images instead of rendering them again (half the
        rendering; the frames are kept, as a GIF keeps them all anyway).
        """
        total = self.view.frames
        kept = {}
        for k in range(total):
            twin = total - k
            if reuse and twin in kept:
                image = kept[twin]
            else:
                image = self.frame(2.0 * np.pi * k / total)
                if reuse and 0 < k and 2 * k < total:
                    kept[k] = image
            yield image
            if progress is not None:
                progress(k + 1, total)

    def close(self) -> None:
        """Free the render window."""
        self.plotter.close()


def write_gif(path, frames, *, fps: float) -> None:
    """GIF that loops forever, one shared 256-colour palette (smaller, no flicker)."""
    from PIL import Image

    frames = list(frames)
    # The palette comes from the frames together, so every frame maps to the same colours.
    strip = Image.fromarray(np.concatenate(frames[:: max(1, len(frames) // 6)]))
    # Octree palettes band least on shaded gradients here, and are the fastest to build.
    palette = strip.quantize(colors=255, method=Image.Quantize.FASTOCTREE, dither=Image.Dither.NONE)
    done = {}  # a frame repeated (HeadScene.frames with reuse) is converted once
    paletted = []
    for f in frames:
        if id(f) not in done:
            done[id(f)] = Image.fromarray(f).quantize(palette=palette, dither=Image.Dither.NONE)
        paletted.append(done[id(f)])
    paletted[0].save(path, format="GIF", save_all=True, append_images=paletted[1:],
                     duration=int(round(1000.0 / fps)), loop=0, optimize=False, disposal=1)


def write_mp4(path, frames, *, fps: float) -> None:
    """H.264 MP4 through imageio-ffmpeg (yuv420p, so it plays nearly everywhere)."""
    import imageio.v2 as imageio

    writer = imageio.get_writer(str(path), format="FFMPEG", mode="I", fps=fps, codec="libx264",
                                pixelformat="yuv420p", macro_block_size=2, quality=7,
                                ffmpeg_log_level="error")
    try:
        for f in frames:
            writer.append_data(f)
    finally:
        writer.close()


# Bytes per pixel, estimated from what is held (not measured): the GIF keeps every frame
# as an RGB array, a Pillow image and a paletted copy (3 + 3 + 1 B/px per frame, rounded
# up to 8); the off-screen renderer's colour, depth and image buffers for one frame are
# taken as 48 B/px, a generous guess (from memory). Common practice, no source.
GIF_BYTES_PER_PIXEL_FRAME = 8
RENDER_BYTES_PER_PIXEL = 48
MEMORY_CEILING = 8e9  # never plan on more than 8 GB, whatever the machine says


def memory_needed(view: View, fmt: str) -> float:
    """Bytes a picture of this view needs at its peak (GIF frames are all held at once)."""
    pixels = float(view.width) * float(view.height)
    held = view.frames if fmt == "gif" else 0
    return pixels * (RENDER_BYTES_PER_PIXEL + held * GIF_BYTES_PER_PIXEL_FRAME)


def memory_available() -> float:
    """Half the memory the system reports available (MemAvailable), at most MEMORY_CEILING."""
    have = None
    try:
        with open("/proc/meminfo", encoding="ascii") as f:
            for line in f:
                if line.startswith("MemAvailable:"):
                    have = float(line.split()[1]) * 1024.0
                    break
    except (OSError, ValueError, IndexError):
        pass
    if have is None:
        try:
            import os

            have = float(os.sysconf("SC_AVPHYS_PAGES") * os.sysconf("SC_PAGE_SIZE"))
        except (AttributeError, ValueError, OSError):
            have = MEMORY_CEILING * 2
    return min(0.5 * have, MEMORY_CEILING)


def check_view(view: View, fmt: str) -> None:
    """Raise InputError for sizes, frame counts and amplitudes that cannot be drawn."""
    from ..errors import InputError

    for key, value, lo, hi in (("--frames", view.frames, 1, 1000), ("--size", view.width, 32, 4096),
                               ("--size", view.height, 32, 4096)):
        if not lo <= value <= hi:
            raise InputError(key, value, f"must be from {lo} to {hi}")
    if not 0.0 < view.amplitude <= 1.0:
        raise InputError("--amplitude", view.amplitude, "must be above 0 and at most 1 (fraction of the radius)")
    if not 0.5 <= view.fps <= 120:
        raise InputError("--fps", view.fps, "must be from 0.5 to 120")
    if not -90.0 <= view.elevation <= 90.0:
        raise InputError("--elevation", view.elevation, "must be from -90 to 90 degrees")
    if not -3600.0 <= view.azimuth <= 3600.0:
        raise InputError("--azimuth", view.azimuth, "must be from -3600 to 3600 degrees")
    need, have = memory_needed(view, fmt), memory_available()
    if need > have:
        raise InputError("--frames and --size", f"{view.frames} frames of {view.width}x{view.height}",
                         f"would need about {need / 1e9:.3g} GB of memory, more than the {have / 1e9:.3g} GB "
                         f"this machine can spare (half its free memory, at most {MEMORY_CEILING / 1e9:g} GB): "
                         "use fewer frames, a smaller size"
                         + (", or .mp4 (frames are not all held at once)" if fmt == "gif" else ""))
    if fmt == "mp4" and (view.width % 2 or view.height % 2):
        raise InputError("--size", f"{view.width}x{view.height}", "an MP4 needs an even width and height")
    if fmt not in FORMATS:
        raise InputError("--out", fmt, f"the 3D picture is written as one of: {', '.join(FORMATS)}")


def render_mode(modeset, mode, path, *, view: View = View(), reference=None, progress=None) -> None:
    """Write a GIF or MP4 of one period of ``mode``, or a PNG of its peak (format from the suffix).

    Parameters
    ----------
    modeset : membrane.modes.ModeSet
        Solved modes (for the title's ratio and the drum's body).
    mode : membrane.modes.Mode
        The mode.
    path : path-like
        Output file; ``.gif``, ``.mp4`` or ``.png``.
    view : View
        Frames, size, exaggeration, camera.
    reference : (int, int)
        Mode the ratio in the title is taken to.
    progress : callable, optional
        ``progress(k, total)`` after each frame.
    """
    fmt = Path(path).suffix.lower().lstrip(".")
    check_view(view, fmt)
    scene = HeadScene(modeset, mode, view, reference=reference)
    try:
        if fmt == "png":
            from PIL import Image

            Image.fromarray(scene.frame(0.0)).save(path, format="PNG", optimize=True)
        elif fmt == "gif":
            write_gif(path, list(scene.frames(progress, reuse=True)), fps=view.fps)
        else:
            write_mp4(path, scene.frames(progress), fps=view.fps)
    finally:
        scene.close()
