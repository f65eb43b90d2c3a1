"""Reading a Parquet file through pandas."""

from __future__ import annotations

from pathlib import Path

import pandas as pd

from ..errors import InputError
from .table import SUPPORTED_EXTENSIONS, Table, table_from_frame


def read_parquet(path: Path) -> Table:
    """The file's frame as a table, rows numbered as if written out with a header line."""
    try:
        frame = pd.read_parquet(path)
    except Exception as exc:  # noqa: BLE001 - any failure means a bad file
        raise InputError(f"cannot read {path.name!r} as a Parquet file ({type(exc).__name__}); "
                         f"supported file types are {', '.join(SUPPORTED_EXTENSIONS)}") from None
    return table_from_frame(frame, f"file {path.name!r}")
