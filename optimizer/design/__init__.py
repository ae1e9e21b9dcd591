"""The design: the case in SI, the service (absorb or strip), internals, the flowsheet, cost lines, limits, the space."""
