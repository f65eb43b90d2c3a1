"""Every choice an analysis depends on, as frozen values checked in one place.

``Settings`` is made of three parts, each a frozen value: ``ModelSettings`` (the trend: shape,
seasonality, season length), ``BreakSettings`` (the break search) and ``EvaluationSettings``
(the rolling origin and the horizon). ``RULES`` is the one table of what each field allows; every
part checks its fields against it when made, so a bad value fails at once, in one line, naming
the parameter (or, on the command line, the flag). ``Settings(shape=..., horizon=...)`` builds
the parts from flat keywords.

Limits that depend on the series are checked against it here too (``horizon_for``,
``resolve_spec``): the horizon may be at most the length of the series (a trend carried further
than the history it was fitted on says little; the rolling origin needs far less), and a season
must fit at least twice into the series.
"""

from __future__ import annotations

import datetime as _dt
import math
import numbers
from dataclasses import asdict, dataclass, fields, replace
from typing import TYPE_CHECKING, Any, ClassVar

from .errors import InputError, about, option

if TYPE_CHECKING:
    from .design import TrendSpec

# the words ``design`` knows (a test checks they agree); written here so that reading the
# settings, as the command line does for --help, loads no numerical library
SHAPES = ("linear", "exponential", "quadratic")
SEASONALITIES = ("none", "dummies", "adjust")

DEFAULT_MAX_BREAKS = 3  # ``max_breaks=None``: up to this many, as many as the series can hold
MAX_BREAKS_LIMIT = 10  # the sequential tests' tables stop well before this; more is not a trend
MAX_SEASON_LENGTH = 1000  # 365-day years and 168-hour weeks fit; more columns than that do not
MAX_HORIZON = 100_000  # a hard stop before the series is known; see ``horizon_for`` for the rule
MAX_PERIODS = 10_000_000  # first origin, step and trim in periods: far beyond any series we read


@dataclass(frozen=True)
class Rule:
    """What one setting allows: a ``choice`` among words, a ``whole`` number in a range, a
    ``flag`` (True/False), the ``trim`` (share or periods) or ``dates`` (event dates)."""

    form: str
    choices: tuple[str, ...] = ()
    least: int = 0
    most: int | None = None
    optional: bool = False  # None allowed (meaning: the default the docstring names)

    def check(self, name: str, value: Any) -> Any:
        """``value`` in its normal form, or an InputError naming ``name``."""
        if value is None:
            if self.optional:
                return () if self.form == "dates" else None
            raise InputError(f"{about(name)}: a value is needed")
        return getattr(self, "_" + self.form)(name, value)

    def from_text(self, name: str, text: str | None) -> Any:
        """The value of command-line text (numbers are parsed here, then checked)."""
        if text is None or not isinstance(text, str) or self.form in ("choice", "flag", "dates"):
            return text
        try:
            return int(text) if self.form == "whole" else float(text)
        except ValueError:
            kind = "a whole number" if self.form == "whole" else "a number"
            raise InputError(f"{about(name)}: expected {kind}, got {text!r}") from None

    def describe(self) -> str:
        if self.form == "choice":
            return "one of " + ", ".join(self.choices)
        if self.form == "whole":
            return (f"a whole number from {self.least} to {self.most}" if self.most is not None
                    else f"a whole number of {self.least} or more")
        if self.form == "flag":
            return "True or False"
        if self.form == "trim":
            return "a share between 0 and 0.5 or a whole number of periods"
        return "a date, a position, or a list of them"

    def _choice(self, name: str, value: Any) -> str:
        if not isinstance(value, str):
            raise InputError(f"{about(name)}: expected {self.describe()}, got {_shown(value)}")
        word = value.strip().lower()
        if word not in self.choices:
            raise InputError(f"{about(name)}: {value!r} is not {self.describe()}")
        return word

    def _whole(self, name: str, value: Any) -> int:
        number = _real(name, value, self.describe())
        if not math.isfinite(number) or number != int(number):
            raise InputError(f"{about(name)}: expected {self.describe()}, got {_shown(value)}")
        whole = int(number)
        if whole < self.least or (self.most is not None and whole > self.most):
            raise InputError(f"{about(name)}: expected {self.describe()}, got {_shown(value)}")
        return whole

    def _flag(self, name: str, value: Any) -> bool:
        if not _is_bool(value):
            raise InputError(f"{about(name)}: expected True or False, got {_shown(value)}")
        return bool(value)

    def _trim(self, name: str, value: Any) -> float | int:
        number = _real(name, value, self.describe())
        if math.isfinite(number) and 0 < number < 0.5:
            return float(number)
        if math.isfinite(number) and 1 <= number <= MAX_PERIODS and number == int(number):
            return int(number)
        if math.isfinite(number) and 0.5 <= number < 1:
            raise InputError(f"{about(name)}: a share must be below 0.5, got {_shown(value)}")
        raise InputError(f"{about(name)}: expected {self.describe()}, got {_shown(value)}")

    def _dates(self, name: str, value: Any) -> tuple[str | int, ...]:
        items = [value] if _one_date(value) else value
        try:
            items = list(items)
        except TypeError:
            raise InputError(f"{about(name)}: expected {self.describe()}, "
                             f"got {_shown(value)}") from None
        out: list[str | int] = []
        for item in items:
            if not _one_date(item):
                raise InputError(f"{about(name)}: {_shown(item)} is not a date or a position")
            if _is_bool(item):
                raise InputError(f"{about(name)}: {_shown(item)} is not a date or a position")
            if isinstance(item, numbers.Integral):
                out.append(int(item))
            elif isinstance(item, str):
                out.append(item.strip())
            else:  # datetime, date, pandas Timestamp or Period, numpy datetime64
                out.append(_iso(item))
        return tuple(out)


def _shown(value: Any) -> str:
    text = repr(value)
    if len(text) > 40:
        text = text[:37] + "..."
    kind = type(value).__name__
    return f"{text} ({'text' if isinstance(value, str) else kind})" \
        if isinstance(value, str) or not isinstance(value, numbers.Number) else text


def _is_bool(value: Any) -> bool:
    """True and False, Python's or numpy's (numpy is not imported to ask)."""
    return isinstance(value, bool) or type(value).__name__ in ("bool_", "bool")


def _real(name: str, value: Any, wanted: str) -> float:
    """A real number, refusing text, True/False and complex numbers (a common slip from
    Python: ``horizon='12'``)."""
    if _is_bool(value) or not isinstance(value, numbers.Real):
        raise InputError(f"{about(name)}: expected {wanted}, got {_shown(value)}")
    try:
        return float(value)
    except OverflowError:  # an integer too large for a float
        return math.inf


def _one_date(value: Any) -> bool:
    return isinstance(value, (str, numbers.Integral, _dt.date)) \
        or type(value).__name__ in ("Timestamp", "Period", "datetime64")


def _iso(value: Any) -> str:
    if type(value).__name__ == "Period":
        return str(value.start_time.date())
    if type(value).__name__ == "datetime64":
        return str(value.astype("datetime64[D]"))
    if isinstance(value, _dt.datetime):
        return value.date().isoformat()
    return value.isoformat()


RULES: dict[str, Rule] = {
    # the trend
    "shape": Rule("choice", ("auto",) + SHAPES),
    "seasonality": Rule("choice", ("auto",) + SEASONALITIES),
    "season_length": Rule("whole", least=1, most=MAX_SEASON_LENGTH, optional=True),
    # the break search
    "kind": Rule("choice", ("auto", "level", "slope", "both")),
    "max_breaks": Rule("whole", least=0, most=MAX_BREAKS_LIMIT, optional=True),
    "trim": Rule("trim", optional=True),
    "criterion": Rule("choice", ("sequential", "bic", "lwz")),
    "events": Rule("dates", optional=True),
    "seasonal_by_regime": Rule("flag"),
    "serial_correlation": Rule("choice", ("allow", "ignore")),
    "method": Rule("choice", ("auto", "exact", "pelt")),
    # the rolling origin
    "horizon": Rule("whole", least=1, most=MAX_HORIZON, optional=True),
    "first_origin": Rule("whole", least=1, most=MAX_PERIODS, optional=True),
    "step": Rule("whole", least=1, most=MAX_PERIODS),
    "reuse_breaks": Rule("flag"),
}


class _Checked:
    """Checks and normalises every field against ``RULES`` when the value is made."""

    def __post_init__(self) -> None:
        for f in fields(self):  # type: ignore[arg-type]
            object.__setattr__(self, f.name, RULES[f.name].check(f.name, getattr(self, f.name)))

    def to_dict(self) -> dict:
        return {k: (list(v) if isinstance(v, tuple) else v)
                for k, v in asdict(self).items()}  # type: ignore[call-overload]


@dataclass(frozen=True)
class ModelSettings(_Checked):
    """The trend: ``shape='auto'`` lets the verdict choose the shape per series
    (``regimetrend.verdict``; commands that fit one shape, ``forecast`` and ``scan``, read it
    as linear); ``seasonality='auto'`` means dummies when the calendar has seasons;
    ``season_length=None`` the calendar's own (see ``resolve_spec``)."""

    shape: str = "auto"
    seasonality: str = "auto"
    season_length: int | None = None

    def spec_for(self, series) -> TrendSpec:
        return resolve_spec(series, self.shape, self.seasonality, self.season_length)


@dataclass(frozen=True)
class BreakSettings(_Checked):
    """The break search (see ``breaks.detect``): ``max_breaks=None`` is up to
    ``DEFAULT_MAX_BREAKS``, as many as the series can hold; ``trim=None`` the default shortest
    regime; ``events`` dates tested by the Chow test (one date or several)."""

    kind: str = "auto"
    max_breaks: int | None = None
    trim: float | int | None = None
    criterion: str = "sequential"
    events: tuple[str | int, ...] = ()
    seasonal_by_regime: bool = False
    serial_correlation: str = "allow"
    method: str = "auto"


@dataclass(frozen=True)
class EvaluationSettings(_Checked):
    """The rolling origin: ``horizon=None`` is the calendar's default horizon
    (``evaluate.rolling.default_horizon``: 4 years, 4 quarters, 12 months, 13 weeks, 14 days,
    shorter on short series); ``first_origin=None`` the default of
    ``evaluate.rolling.plan_origins``."""

    horizon: int | None = None
    first_origin: int | None = None
    step: int = 1
    reuse_breaks: bool = False

    def horizon_for(self, series) -> int:
        """The horizon for ``series``: at most its length (see the module docstring)."""
        if self.horizon is None:
            from .evaluate.rolling import default_horizon

            return default_horizon(series.n, series.frequency.unit, series.frequency.step)
        if self.horizon > series.n:
            raise InputError(f"{about('horizon')}: {self.horizon} periods ahead is more than the "
                             f"{series.n} periods of history; use at most {series.n}")
        return self.horizon


PARTS: dict[str, type[_Checked]] = {"model": ModelSettings, "breaks": BreakSettings,
                                    "evaluation": EvaluationSettings}
PART_OF: dict[str, str] = {f.name: part for part, cls in PARTS.items()
                           for f in fields(cls)}  # type: ignore[arg-type]


@dataclass(frozen=True, init=False)
class Settings:
    """Every choice an analysis depends on, in one frozen value (so results are reproducible).

    Made from parts, ``Settings(model=ModelSettings(...), breaks=BreakSettings(...))``, or from
    flat keywords, ``Settings(shape="exponential", horizon=12)`` (both at once: the keywords
    win). The flat names read through too: ``settings.horizon``.
    """

    model: ModelSettings
    breaks: BreakSettings
    evaluation: EvaluationSettings

    FIELDS: ClassVar[tuple[str, ...]] = tuple(PART_OF)

    def __init__(self, model: ModelSettings | None = None, breaks: BreakSettings | None = None,
                 evaluation: EvaluationSettings | None = None, **choices: Any):
        given = {"model": model, "breaks": breaks, "evaluation": evaluation}
        for part, cls in PARTS.items():
            if given[part] is not None and not isinstance(given[part], cls):
                raise InputError(f"{about(part)}: expected a {cls.__name__}, "
                                 f"got {type(given[part]).__name__}")
        unknown = sorted(set(choices) - set(PART_OF))
        if unknown:
            raise InputError(f"{about(unknown[0])}: not a setting; the settings are "
                             f"{', '.join(option(n) for n in PART_OF)}")
        for part, cls in PARTS.items():
            mine = {k: v for k, v in choices.items() if PART_OF[k] == part}
            value: Any = given[part] or cls()
            object.__setattr__(self, part, replace(value, **mine) if mine else value)

    @classmethod
    def coerce(cls, settings: Settings | None, choices: dict, parts=tuple(PARTS),
               caller: str = "") -> Settings:
        """``settings`` (default all defaults) with the flat ``choices`` applied; refuses
        choices outside ``parts`` (``detect_breaks`` has no horizon, say)."""
        if settings is not None and not isinstance(settings, Settings):
            raise InputError(f"{about('settings')}: expected a Settings, "
                             f"got {type(settings).__name__}")
        for name in choices:
            if name in PART_OF and PART_OF[name] not in parts:
                raise InputError(f"{about(name)}: {caller or 'this function'} does not use "
                                 f"{PART_OF[name]} settings")
        base = settings or cls()
        return cls(base.model, base.breaks, base.evaluation, **choices) if choices else base

    def spec_for(self, series) -> TrendSpec:
        return self.model.spec_for(series)

    def horizon_for(self, series) -> int:
        return self.evaluation.horizon_for(series)

    def to_dict(self) -> dict:
        """Flat, as the command line and the JSON output name them."""
        out: dict = {}
        for part in PARTS:
            out.update(getattr(self, part).to_dict())
        return out


def _flat_reader(name: str, part: str) -> property:
    return property(lambda self: getattr(getattr(self, part), name),
                    doc=f"``{part}.{name}``")


for _name, _part in PART_OF.items():
    setattr(Settings, _name, _flat_reader(_name, _part))


def resolve_spec(series, shape: str = "linear", seasonality: str = "auto",
                 season_length: int | None = None) -> TrendSpec:
    """A TrendSpec for ``series``: the season length defaults to the calendar's (12 monthly,
    4 quarterly, 52 weekly, 7 daily, none for annual or multi-unit calendars); ``auto``
    seasonality means dummies when the calendar has seasons and none otherwise."""
    model = ModelSettings(shape, seasonality, season_length)
    if model.shape == "auto":  # the verdict chooses the shape; the base spec is the linear one
        model = replace(model, shape="linear")
    s = series.frequency.season_length if model.season_length is None else model.season_length
    seasonality = model.seasonality
    if seasonality == "auto":
        seasonality = "dummies" if s > 1 else "none"
    elif seasonality != "none" and s < 2:
        raise InputError(f"{about('seasonality')}: a {series.frequency.name} series has no "
                         f"seasonal cycle; use none, or give {option('season_length')}")
    if model.season_length is not None and seasonality != "none" and 2 * s > series.n:
        raise InputError(f"{about('season_length')}: a season of {s} periods does not fit twice "
                         f"into the {series.n} periods of the series; give a shorter "
                         f"{option('season_length')} or {option('seasonality')} none")
    from .design import TrendSpec

    spec = TrendSpec(shape=model.shape, seasonality=seasonality, season_length=s)
    if spec.log_scale:
        from .intake import require_positive

        require_positive(series, f"{about('shape')}: the exponential shape (fitted on logs)")
    return spec
