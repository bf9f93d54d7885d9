"""Frame sinks that stream to disk: MP4 (H.264, yuv420p), GIF and numbered PNGs.

Each writes under a temporary name in the target's own folder
(``swingsim.io.files``) and renames it into place on success (so a reader never sees half a file, and a failed render
leaves nothing behind); frames are passed on one at a time, never all held.
"""

from __future__ import annotations

import os
import queue
import shutil
import subprocess
import tempfile
import threading
from pathlib import Path

import numpy as np

from swingsim.io.files import TMP_PREFIX, WRITTEN, atomic_path, replace_folder

#: H.264 settings.  'superfast' took about 10% less encoder CPU a frame than 'veryfast'
#: on the demo clip at 1280x720 (10.1 against 11.2 ms, three runs each, same session) with
#: the same fidelity (PSNR against the drawn frames 35.3 against 34.9 dB) and files about
#: 1.8 times as large (4.7 MB a minute); the encoder shares two cores with the renderer.
#: ('-sws_flags fast_bilinear' saved as much but cost 5 dB: not used.)
#: CRF 20 is visually clean for flat-shaded pictures (common practice: 18-23).
X264_PRESET = "superfast"
X264_CRF = "20"
#: Frames waiting for the encoder's pipe: enough to ride out its uneven pace, few enough to
#: bound memory (a 1280x720 frame is 2.8 MB).
PIPE_QUEUE_FRAMES = 4


def _tmp_name(target: Path, suffix: str = "") -> Path:
    """A temporary file beside ``target`` that ``report.files.clean_partials`` knows to remove."""
    fd, name = tempfile.mkstemp(prefix=TMP_PREFIX + target.name + "-", suffix=suffix, dir=target.parent)
    os.close(fd)
    return Path(name)


class _Atomic:
    """``report.files.atomic_path`` held open across many writes: finish() renames, abort() removes."""

    def __init__(self, target: Path):
        self._cm = atomic_path(target, suffix=".part")
        self.tmp = self._cm.__enter__()

    def finish(self):
        self._cm.__exit__(None, None, None)

    def abort(self):
        err = RuntimeError("aborted")
        self._cm.__exit__(RuntimeError, err, None)


def write_png(path, image: np.ndarray) -> Path:
    """One PNG, written atomically.

    Parameters
    ----------
    path : str or pathlib.Path
        The file to write.
    image : numpy.ndarray
        (height, width, 3) uint8 RGB.

    Returns
    -------
    pathlib.Path
        ``path``.
    """
    import imageio.v3 as iio

    with atomic_path(path) as tmp:
        iio.imwrite(tmp, image, extension=".png", compress_level=3)
    return Path(path)


class _Pipe:
    """ffmpeg reading raw RGB frames from a pipe."""

    def __init__(self, target: Path, size, fps: float, out_args: list, extra_inputs: list = ()):
        import imageio_ffmpeg

        self.target = Path(target)
        self.target.parent.mkdir(parents=True, exist_ok=True)
        self._file = _Atomic(self.target)
        self.tmp = self._file.tmp
        w, h = size
        cmd = [imageio_ffmpeg.get_ffmpeg_exe(), "-y", "-loglevel", "error", "-f", "rawvideo",
               "-pix_fmt", "rgb24", "-s", f"{w}x{h}", "-r", f"{fps:g}", "-i", "pipe:0",
               *extra_inputs, *out_args, str(self.tmp)]
        self.proc = subprocess.Popen(cmd, stdin=subprocess.PIPE, stdout=subprocess.DEVNULL,
                                     stderr=subprocess.PIPE)
        self.count = 0
        # Frames go to ffmpeg from a feeder thread (a pipe write releases the GIL), so the
        # renderer draws the next frame while ffmpeg takes in this one; the small queue
        # bounds memory and keeps the renderer at most a few frames ahead.
        self._queue = queue.Queue(maxsize=PIPE_QUEUE_FRAMES)
        self._broken = False
        self._feeder = threading.Thread(target=self._feed, name="ffmpeg-feeder", daemon=True)
        self._feeder.start()

    def _feed(self) -> None:
        while True:
            frame = self._queue.get()
            if frame is None:
                return
            if self._broken:
                continue  # drain: the writer learns of the failure at its next write or at close
            try:
                self.proc.stdin.write(memoryview(frame).cast("B"))
            except (BrokenPipeError, OSError, ValueError):
                self._broken = True

    def _stop_feeder(self) -> None:
        if self._feeder.is_alive():
            self._queue.put(None)
            self._feeder.join()

    def write(self, frame: np.ndarray) -> None:
        if self._broken:
            self._stop_feeder()
            self._fail()
        # handed over, not copied: the frame must not be changed after this call
        # (``Stage.grab`` returns a new array for every frame)
        self._queue.put(np.ascontiguousarray(frame, dtype=np.uint8))
        self.count += 1

    def _fail(self):
        err = self.proc.stderr.read().decode(errors="replace").strip().splitlines()
        self.abort()
        raise RuntimeError("the video encoder (ffmpeg) failed: " + (err[-1] if err else "no message"))

    def close(self) -> Path:
        self._stop_feeder()
        try:
            self.proc.stdin.close()
        except (BrokenPipeError, OSError):
            self._broken = True
        rc = self.proc.wait()
        if rc != 0 or self._broken:
            self._fail()
        self.proc.stderr.close()
        self._file.finish()
        return self.target

    def abort(self) -> None:
        try:
            self.proc.kill()
            self.proc.wait()
        except OSError:
            pass
        self._broken = True
        self._stop_feeder()
        self._file.abort()


class Mp4Writer(_Pipe):
    """H.264 in MP4 with yuv420p colour, which ordinary players and slide software open."""

    def __init__(self, target, size, fps, threads=None):
        thread_args = [] if threads is None else ["-threads", str(threads)]
        super().__init__(target, size, fps, ["-an", "-c:v", "libx264", "-preset", X264_PRESET,
                                             "-crf", X264_CRF, "-pix_fmt", "yuv420p", *thread_args,
                                             "-movflags", "+faststart", "-f", "mp4"])


class GifWriter(_Pipe):
    """Animated GIF with one palette made beforehand from sample frames (so frames stream).

    GIF stores each frame's delay in whole hundredths of a second.  ffmpeg's GIF
    muxer takes each delay as the difference of the frames' times rounded to that
    unit, so the delays alternate (15 fps: 7, 6, 7, 7, 6, ... cs) and the clip plays
    at its frame rate on average rather than at a rounded one
    (``tests/test_render_video.py`` reads them back).
    """

    def __init__(self, target, size, fps, palette_frames):
        self._pal = _tmp_name(Path(target), ".png")
        _write_palette(self._pal, palette_frames)
        super().__init__(target, size, fps, ["-lavfi", "[0:v][1:v]paletteuse=dither=bayer:bayer_scale=4",
                                             "-loop", "0", "-f", "gif"], extra_inputs=["-i", str(self._pal)])

    def close(self):
        """Finish the GIF and put it in place.

        Returns
        -------
        pathlib.Path
            The GIF.
        """
        try:
            return super().close()
        finally:
            self._pal.unlink(missing_ok=True)

    def abort(self):
        """Stop the encoder and leave nothing behind."""
        super().abort()
        self._pal.unlink(missing_ok=True)


def _write_palette(path: Path, frames) -> None:
    """A 16x16 PNG of the 256 colours that best cover ``frames`` (median cut, Pillow)."""
    from PIL import Image

    stack = np.concatenate([np.asarray(f)[::2, ::2] for f in frames], axis=0)
    q = Image.fromarray(stack).quantize(colors=256, method=Image.Quantize.MEDIANCUT)
    pal = np.array(q.getpalette()[:768], dtype=np.uint8).reshape(-1, 3)
    if len(pal) < 256:
        pal = np.concatenate([pal, np.repeat(pal[-1:], 256 - len(pal), axis=0)])
    Image.fromarray(pal.reshape(16, 16, 3)).save(path, format="PNG")


class PngSequenceWriter:
    """Numbered PNGs ``frame_00000.png``... in a folder, renamed into place at the end."""

    def __init__(self, target, size, fps):
        self.target = Path(target)
        self.target.parent.mkdir(parents=True, exist_ok=True)
        self.tmp = Path(tempfile.mkdtemp(prefix=TMP_PREFIX + self.target.name + "-", dir=self.target.parent))
        mask = os.umask(0)
        os.umask(mask)
        os.chmod(self.tmp, 0o777 & ~mask)
        self.count = 0

    def write(self, frame):
        """Write the next numbered frame.

        Parameters
        ----------
        frame : numpy.ndarray
            (height, width, 3) uint8 RGB.
        """
        import imageio.v3 as iio

        iio.imwrite(self.tmp / f"frame_{self.count:05d}.png", frame, extension=".png", compress_level=1)
        self.count += 1

    def close(self) -> Path:
        """Put the folder of frames in place (replacing an older one).

        Returns
        -------
        pathlib.Path
            The folder.
        """
        replace_folder(self.tmp, self.target)
        WRITTEN.append(self.target)
        return self.target

    def abort(self):
        """Remove the frames written so far."""
        shutil.rmtree(self.tmp, ignore_errors=True)


def _concat_quote(path: str) -> str:
    """A path quoted for ffmpeg's concat list: in ``'...'`` a quote is written ``'\\''`` (ffmpeg-formats, concat)."""
    return "'" + path.replace("'", "'\\''") + "'"


def concat_mp4(parts, target: Path) -> Path:
    """Join MP4 segments of identical encoding into one file without re-encoding (ffmpeg's concat demuxer).

    Parameters
    ----------
    parts : sequence of pathlib.Path
        The segments, in order.
    target : str or pathlib.Path
        The MP4 to write (atomically).

    Returns
    -------
    pathlib.Path
        ``target``.

    Raises
    ------
    RuntimeError
        ffmpeg failed (its last line is named).
    """
    import imageio_ffmpeg

    target = Path(target)
    listing = _tmp_name(target, ".txt")
    try:
        listing.write_text("".join(f"file {_concat_quote(Path(p).resolve().as_posix())}\n" for p in parts),
                           encoding="utf-8")
        with atomic_path(target, suffix=".part") as tmp:
            r = subprocess.run([imageio_ffmpeg.get_ffmpeg_exe(), "-y", "-loglevel", "error", "-f", "concat",
                                "-safe", "0", "-i", str(listing), "-c", "copy", "-movflags", "+faststart",
                                "-f", "mp4", str(tmp)], capture_output=True)
            if r.returncode != 0:
                msg = r.stderr.decode(errors="replace").strip().splitlines()
                raise RuntimeError("joining the video segments failed: " + (msg[-1] if msg else "no message"))
    finally:
        listing.unlink(missing_ok=True)
    return target
