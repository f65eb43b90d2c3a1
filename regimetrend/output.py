"""Writing results: plain JSON values, and files that appear whole or not at all.

Every output is written to a temporary file in the target folder and renamed into place, so a
failure never leaves a half-written file, and inputs are never opened for writing.
"""

from __future__ import annotations

import json
import math
import os
import tempfile
from contextlib import contextmanager
from contextvars import ContextVar
from pathlib import Path

import numpy as np

from .errors import InputError


def json_safe(obj):
    """Plain JSON types: NaN and infinities become null, numpy scalars become Python ones."""
    if isinstance(obj, dict):
        return {str(k): json_safe(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [json_safe(v) for v in obj]
    if isinstance(obj, np.ndarray):
        return [json_safe(v) for v in obj.tolist()]
    if isinstance(obj, (np.floating, float)):
        v = float(obj)
        return v if math.isfinite(v) else None
    if isinstance(obj, np.integer):
        return int(obj)
    if isinstance(obj, np.bool_):
        return bool(obj)
    if isinstance(obj, np.datetime64):
        return str(obj.astype("datetime64[D]"))
    return obj


def dumps(obj) -> str:
    return json.dumps(json_safe(obj), indent=2, allow_nan=False)


_PROTECTED: ContextVar[tuple] = ContextVar("regimetrend_protected_inputs", default=())


@contextmanager
def protecting(*inputs):
    """Within this block, ``write_atomic`` refuses to replace any of ``inputs``."""
    paths = tuple(Path(p) for p in inputs if p is not None and Path(p).exists())
    token = _PROTECTED.set(_PROTECTED.get() + paths)
    try:
        yield
    finally:
        _PROTECTED.reset(token)


def check_targets(paths, what: str = "output") -> None:
    """Refuse, before anything is written, a target that is a folder or a protected input."""
    for path in paths:
        path = Path(path)
        if path.is_dir():
            raise InputError(f"{what}: {path} is a folder, not a file name")
        if path.exists() and any(os.path.samefile(path, p) for p in _PROTECTED.get()):
            raise InputError(f"{what}: {path} is the input file, which regimetrend never "
                             f"overwrites; choose another name")


def write_atomic(path, data, what: str = "output", make_folders: bool = True,
                 sweep: bool = True) -> Path:
    """Write text or bytes to ``path`` through a temporary file renamed into place.

    Refuses folders and protected inputs (see ``protecting``); with ``make_folders`` False the
    target's folder must exist already (for file names the user typed). Problems writing are
    reported as ``InputError`` naming ``what`` (an option such as ``--errors``). ``sweep``
    False: the caller already removed a killed run's temporaries from the folder once (the
    portfolio's thousands of result files in one folder: a sweep per write scans them all)."""
    path = Path(path)
    check_targets([path], what)
    if not path.parent.is_dir():
        if not make_folders:
            raise InputError(f"{what}: folder {path.parent} does not exist")
        try:
            path.parent.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise InputError(f"{what}: cannot create folder {path.parent}: "
                             f"{exc.strerror or exc}") from None
    mode = "wb" if isinstance(data, (bytes, bytearray)) else "w"
    from .output_folder import remove_orphans, temp_prefix

    if sweep:
        remove_orphans(path.parent, {Path(path.name)})  # left by a run that was killed
    try:
        fd, tmp = tempfile.mkstemp(prefix=temp_prefix(path.name), dir=path.parent)
    except OSError as exc:
        raise InputError(f"{what}: cannot write in {path.parent}: {exc.strerror or exc}") from None
    try:
        with os.fdopen(fd, mode, **({} if mode == "wb" else {"encoding": "utf-8", "newline": ""})) as fh:  # type: ignore[call-overload]
            fh.write(data)
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)  # mkstemp makes files private; outputs are ordinary files
        os.replace(tmp, path)
    except BaseException as exc:
        if os.path.exists(tmp):
            os.unlink(tmp)
        if isinstance(exc, OSError):
            raise InputError(f"{what}: cannot write {path}: {exc.strerror or exc}") from None
        raise
    return path
