"""run layer of plantlint."""
