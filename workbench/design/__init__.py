"""Verdicts from results: criteria, checks, fatigue, frequency separation, sizing.

Also allowables, stress concentration, preferred sizes and the independent check (force method).

Imports :mod:`workbench.solver` and :mod:`workbench.case`, never a face (panel, record, cli).
Importing this package is light; import the module you need (``workbench.design.checks``).
"""
