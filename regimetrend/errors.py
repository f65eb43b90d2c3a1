"""The one exception type users see.

Every problem caused by the input (a bad file, a bad row, a bad option) is raised as
``InputError`` with a plain message that names the row, column or option. The CLI prints the
message on one line and exits with code 2; Python callers can catch it like any exception.
"""


class InputError(ValueError):
    """Bad input or a bad option; the message says what and where, in one line."""

    def __init__(self, message: str):
        super().__init__(" ".join(str(message).split()))
