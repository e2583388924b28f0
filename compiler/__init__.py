"""anomark: checked derivations of anomalies from Markdown documents."""

__version__ = "0.1.0"
