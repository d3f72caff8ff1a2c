"""picker: design active analog filters from the parts on hand."""

__version__ = "0.1.0"
