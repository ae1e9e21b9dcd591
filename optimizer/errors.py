"""The kinds of failure the API reports, one class each, and the exit codes the CLI gives them.

Imported cheaply by the CLI: nothing here loads numpy or the models.

Exit codes of the ``towercost`` commands:

    0    done
    2    bad input: a scenario value, a command option, an output file or folder (one line naming it)
    3    no design meets the spec within the limits (the line names the limit and the best figure reached,
         for each candidate)
    4    ``evaluate``: the design given misses a spec or breaks a limit (its sheet is printed; the line names which)
    70   internal error: a bug in towercost, never in the input (one line; the details in a log file)
    130  interrupted (Ctrl-C): no partial file is left
"""

#: Exit codes of the ``towercost`` commands.
DONE, BAD_INPUT, INFEASIBLE, MISSES, INTERNAL, INTERRUPTED = 0, 2, 3, 4, 70, 130


class ScenarioError(ValueError):
    """A scenario value (or command option) that cannot be accepted; the message is one line for the user."""


class InfeasibleSpec(ValueError):
    """No design in the space meets the spec within the limits; the message says why."""


class TooLarge(ScenarioError):
    """The design space would not fit in memory; the message gives the estimate and the values to change."""


class OutputError(ScenarioError):
    """An output file or folder that cannot be written as asked; the message says why in words."""
