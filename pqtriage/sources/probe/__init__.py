"""Discovery by probing live endpoints named explicitly (TLS handshakes, SSH KEXINIT)."""
