"""Units of measure: the application's one pint registry, unit systems and parsing."""
