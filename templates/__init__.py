"""The report templates; installed as the package ``compiler.templates`` (see pyproject.toml)."""
