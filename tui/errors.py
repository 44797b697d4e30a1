"""Errors meant for people: each message is one line saying what was wrong and what to do."""


class UsageError(Exception):
    """Bad input from a person: option, file, profile or value (exit status 2)."""


class RuntimeFailure(Exception):
    """The job could not be done at run time: device gone, disk full (exit status 1)."""
