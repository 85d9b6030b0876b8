"""kernel layer of plantlint."""
