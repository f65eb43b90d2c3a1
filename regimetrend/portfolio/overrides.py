"""Per-series settings: one set for the whole portfolio, overridden per id from a file.

The override file (CSV, .xlsx or JSON) has one row per series to change. CSV/.xlsx: an ``id``
column (or the portfolio's own id columns) and one column per setting to override, named as the
settings in Python (``shape``, ``seasonality``, ``season_length``, ``kind``, ``max_breaks``,
``trim``, ``criterion``, ``events`` (dates separated by ``;``), ``seasonal_by_regime``,
``serial_correlation``, ``horizon``, ``first_origin``, ``step``, ``reuse_breaks``, ...) or as
their command-line options without the leading dashes (``max-breaks``, ``event``); an empty
cell keeps the portfolio's setting. JSON: an object mapping each id
to an object of settings. Every value is checked here, so a typo stops the run before any
series is analysed, with the row and column named.
"""

from __future__ import annotations

import json
import math
from dataclasses import replace
from pathlib import Path

import pandas as pd

from ..errors import InputError
from ..settings import RULES, Settings
from .inputs import ID_SEPARATOR, _id_text

SETTING_NAMES = tuple(RULES)  # every setting; values are checked by ``settings.RULES``
_TRUE = {"true", "yes", "1", "y"}
_FALSE = {"false", "no", "0", "n"}


def parse_setting(name: str, value, where: str):
    """The typed value of one override cell, checked by the settings' table
    (``settings.RULES``, the same rules as the command line and Python); ``where`` names the
    row and column for errors. Cells are text: yes/no for switches, dates separated by ``;``."""
    name = setting_name(name)
    if name not in RULES:
        raise InputError(f"{where}: unknown setting {name!r}; settings are "
                         f"{', '.join(SETTING_NAMES)}")
    rule = RULES[name]
    text = value.strip() if isinstance(value, str) else value
    if rule.form == "flag" and not isinstance(text, bool):
        word = str(text).lower()
        if word not in _TRUE | _FALSE:
            raise InputError(f"{where}: expected yes or no, got {text!r}")
        text = word in _TRUE
    elif rule.form == "dates" and isinstance(text, str):
        text = tuple(e.strip() for e in text.split(";") if e.strip())
    elif rule.form in ("whole", "trim") and isinstance(text, str):
        try:
            text = float(text)
        except ValueError:
            pass  # the rule refuses text, naming what it expects
    try:
        return rule.check(name, text)
    except InputError as exc:  # the rule's reason, after the row and column
        raise InputError(f"{where}: {str(exc).split(': ', 1)[-1]}") from None


def setting_name(name: str) -> str:
    """The setting a column names: the setting itself (``max_breaks``) or its command-line
    option without dashes (``max-breaks``, ``event`` for ``events``)."""
    from ..cli.names import FLAGS

    word = str(name).strip()
    if word in RULES:
        return word
    by_flag = {flag.lstrip("-"): setting for setting, flag in FLAGS.items() if setting in RULES}
    return by_flag.get(word.lstrip("-"), by_flag.get(word.replace("_", "-"), word))


def with_changes(base: Settings, changes: dict) -> Settings:
    """``base`` with the given fields replaced (the one place settings are combined)."""
    return replace(base, **changes) if changes else base


def read_overrides(path, id_columns: tuple[str, ...], ids) -> dict[str, dict]:
    """{id: {setting: value}} from the override file; every id must be in the portfolio."""
    path = Path(path)
    if not path.is_file():
        raise InputError(f"option --settings-file: file not found: {path}")
    ext = path.suffix.lower()
    known = set(ids)
    if ext == ".json":
        try:
            raw = json.loads(path.read_text(encoding="utf-8"))
        except (UnicodeDecodeError, json.JSONDecodeError) as exc:
            raise InputError(f"option --settings-file: {path.name!r} is not valid JSON "
                             f"({exc})") from None
        if not isinstance(raw, dict):
            raise InputError(f"option --settings-file: {path.name!r} must hold an object "
                             f"mapping each id to its settings")
        out = {}
        for ident, changes in raw.items():
            where = f"{path.name} id {ident!r}"
            if ident not in known:
                raise InputError(f"{where}: no series with this id in the portfolio")
            if not isinstance(changes, dict):
                raise InputError(f"{where}: expected an object of settings")
            out[ident] = {setting_name(k): parse_setting(k, v, f"{where}, setting {k!r}")
                          for k, v in changes.items() if v is not None}
        return out
    if ext in (".csv", ".txt"):
        frame = pd.read_csv(path, dtype=str, keep_default_na=False, sep=None, engine="python",
                            encoding="utf-8-sig")
    elif ext == ".xlsx":
        frame = pd.read_excel(path, dtype=object, engine="openpyxl")
    else:
        raise InputError(f"option --settings-file: {path.name!r} must be .csv, .xlsx or .json")
    frame.columns = [str(c).strip() for c in frame.columns]
    id_cols = ["id"] if "id" in frame.columns else [c for c in id_columns if c in frame.columns]
    if not id_cols or (id_cols != ["id"] and len(id_cols) != len(id_columns)):
        raise InputError(f"option --settings-file: {path.name!r} needs an 'id' column (or the "
                         f"id columns {', '.join(map(repr, id_columns))})")
    for column in frame.columns:  # a misspelt column stops the run even when it is empty
        if column not in id_cols and setting_name(column) not in RULES:
            raise InputError(f"{path.name} column {column!r}: unknown setting; settings are "
                             f"{', '.join(SETTING_NAMES)}")
    named = [setting_name(c) for c in frame.columns if c not in id_cols]
    twice = sorted({c for c in named if named.count(c) > 1})
    if twice:
        raise InputError(f"option --settings-file: {path.name!r} has two columns for the "
                         f"setting {twice[0]!r}")
    out = {}
    for k, record in enumerate(frame.to_dict("records")):
        row = k + 2
        ident = ID_SEPARATOR.join(_id_text(record[c]) for c in id_cols)
        if ident not in known:
            raise InputError(f"{path.name} row {row}: no series with id {ident!r} in the "
                             f"portfolio")
        if ident in out:
            raise InputError(f"{path.name} row {row}: id {ident!r} appears twice")
        changes = {}
        for name, value in record.items():
            if name in id_cols or value is None or (isinstance(value, str) and not value.strip()):
                continue
            if isinstance(value, float) and math.isnan(value):
                continue
            changes[setting_name(str(name))] = parse_setting(
                str(name), value, f"{path.name} row {row}, column {name!r}")
        out[ident] = changes
    return out
