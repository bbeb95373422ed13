"""faultwise: a bench companion for repairing AM broadcast receivers."""

__version__ = "0.1.0"
