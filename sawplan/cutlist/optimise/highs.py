"""HiGHS through highspy: a silent solver instance.

highspy loads in a few hundredths of a second where ``scipy.optimize`` takes
about half a second, and its model calls cost no wrapper work per solve.
highspy prints a banner on stdout the first time a solver is made in a
process; stdout carries the plan (and JSON), so that first solver is made with
the stdout file descriptor pointed at the null device.
"""

from __future__ import annotations

import os
import sys
from typing import Any

_quiet = False


def new_highs() -> Any:
    import highspy

    global _quiet
    if not _quiet:
        sys.stdout.flush()
        saved = os.dup(1)
        null = os.open(os.devnull, os.O_WRONLY)
        try:
            os.dup2(null, 1)
            highs = highspy.Highs()
        finally:
            os.dup2(saved, 1)
            os.close(saved)
            os.close(null)
        _quiet = True
    else:
        highs = highspy.Highs()
    highs.setOptionValue("output_flag", False)
    return highs


def optimal() -> Any:
    import highspy

    return highspy.HighsModelStatus.kOptimal
