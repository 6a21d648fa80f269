"""Discovery by scanning files: keys, certificates, SSH material found on disk."""
