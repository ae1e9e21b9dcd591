"""Scenario reading: the schema (pydantic), units parsed once at the edge (pint), error wording."""

from towercost.scenario.load import load_scenario, parse_scenario
from towercost.scenario.schema import Scenario

__all__ = ["Scenario", "load_scenario", "parse_scenario"]
