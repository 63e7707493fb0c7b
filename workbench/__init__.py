"""workbench: design and check members loaded in torsion."""

__version__ = "0.1.0"
