"""The Python package's version: kept equal to package.json's "version" (a test compares them)."""
__version__ = "0.1.0"
