"""report layer of plantlint."""
