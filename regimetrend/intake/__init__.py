"""Intake: turn an analyst's file or pandas object into a validated, regular ``Series``.

What intake does, in order:

1. read the raw cells (CSV/TXT, Excel .xlsx, Parquet, or a pandas Series/DataFrame) without
   letting any reader guess at types, so every cell keeps the row number it had in the file;
2. find the date column and the value column (or take the ones the caller names);
3. read each date into the start of its period and each value into a float;
4. put the rows in date order, find the calendar (annual ... daily, or a regular multiple),
   and check that the calendar has no duplicates and no holes;
5. fill missing values by linear interpolation only when asked to.

Anything wrong with the input raises ``InputError`` with one line that names the row, the column
or the option to use. Intake never prints, never models and never writes to the input.

Row numbers
-----------
A row number in a message is the row as the analyst sees it in a spreadsheet or text editor: the
header line is row 1 and the first data row is row 2. For CSV and Excel files it is the actual line
or sheet row (blank lines count, exactly as the editor shows them). Parquet files and pandas objects
have no lines, so they are numbered as if written out with a header line: the first data row is
row 2, the n-th data row is row n + 1.

Percent signs
-------------
A value such as ``12%`` is rejected rather than read: it could mean 12 or 0.12, and a growth model
fitted on the wrong scale gives wrong growth figures without any warning. The message asks the
analyst to write the number without the sign, in the scale they mean.

Day and month order
-------------------
Dates such as ``03/04/2019`` are rejected: whether that is March or April depends on the country
of the file's author. ISO dates (``2019-04-03``), ``07/2019`` and ``2019/07`` are read, and
``date_format`` (``--date-format``) reads any other form the caller names.

Modules, in data-flow order (each imports only those above it): ``wording`` (short lists for
messages), ``values`` (value cells), ``dates`` (date forms; the public ``parse_date`` and
``parse_dates``), ``calendar`` (frequency words, inference, regular calendar), ``validate``
(checks later stages ask for), ``table`` (the raw table), ``marks`` (the decimal mark of a
text file), ``text_file``/``excel``/``parquet`` (one reader per format), ``source`` (which
reader), ``columns`` (choosing the date and value columns), ``load`` (``load_series``, and
``as_series`` for the Python API's functions).
"""

from .calendar import FREQUENCY_WORDS, parse_frequency
from .dates import DATE_FORMS_HELP, parse_date, parse_dates
from .load import MIN_POINTS, as_series, load_series
from .table import SUPPORTED_EXTENSIONS
from .validate import require_points, require_positive

__all__ = [
           "DATE_FORMS_HELP",
           "FREQUENCY_WORDS",
           "MIN_POINTS",
           "SUPPORTED_EXTENSIONS",
           "as_series",
           "load_series",
           "parse_date",
           "parse_dates",
           "parse_frequency",
           "require_points",
           "require_positive",
]
