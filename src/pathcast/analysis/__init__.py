"""Analyses that re-solve variants of a scenario: budget achievability and delayed action. They take
:class:`~pathcast.scenario.inputs.ModelInputs`, change them only with ``dataclasses.replace``
(:mod:`pathcast.analysis.variants`) and solve through :func:`pathcast.pipeline.solve_inputs`."""
