"""language layer of plantlint."""
