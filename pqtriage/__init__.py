"""pqtriage: post-quantum migration risk triage for security teams."""

__version__ = "0.1.0"
