"""The kinds of failure the API reports, one class each (imported cheaply by the CLI)."""


class ScenarioError(ValueError):
    """A scenario value that cannot be accepted; the message is one line for the user."""


class InfeasibleSpec(ValueError):
    """No design in the space meets the spec within the limits; the message says why."""
