"""core layer of plantlint."""
