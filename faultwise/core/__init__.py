"""The bottom layer: errors, YAML loading, units and codes, safe text, the workspace.

Imports nothing else of faultwise; every other layer may import it.
"""
