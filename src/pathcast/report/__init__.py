"""Renderers: console tables, figures and the planning memo. They read only RunResult objects."""
