"""Broken and hostile inputs, generated in code (no binary committed), and the tests that feed them to every command."""
