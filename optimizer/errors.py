"""The kinds of failure the API reports, one class each, and the exit codes the CLI gives them.

Imported cheaply by the CLI: nothing here loads numpy or the models.
"""

#: Exit codes of the ``towercost`` commands.
DONE, BAD_INPUT, INFEASIBLE, INTERNAL = 0, 2, 3, 70


class ScenarioError(ValueError):
    """A scenario value (or command option) that cannot be accepted; the message is one line for the user."""


class InfeasibleSpec(ValueError):
    """No design in the space meets the spec within the limits; the message says why."""
