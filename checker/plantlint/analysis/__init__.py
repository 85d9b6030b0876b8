"""analysis layer of plantlint."""
