"""Writing results: plain JSON values, and files that appear whole or not at all.

Every output is written to a temporary file in the target folder and renamed into place, so a
failure never leaves a half-written file, and inputs are never opened for writing.
"""

from __future__ import annotations

import json
import math
import os
import tempfile
from pathlib import Path

import numpy as np


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


def write_atomic(path, data) -> Path:
    """Write text or bytes to ``path`` through a temporary file renamed into place."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    mode = "wb" if isinstance(data, (bytes, bytearray)) else "w"
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", dir=path.parent)
    try:
        with os.fdopen(fd, mode, **({} if mode == "wb" else {"encoding": "utf-8", "newline": ""})) as fh:
            fh.write(data)
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)  # mkstemp makes files private; outputs are ordinary files
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
    return path
