"""The frozen RunResult, its extraction from a solved model, analytics and writers."""
