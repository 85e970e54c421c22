"""Scenario files: YAML + CSV reading, ``extends`` merging, units, validation, numeric inputs."""
