"""``python -m pqtriage.cli``: the same as the pqtriage command."""

from __future__ import annotations

import sys

from pqtriage.cli import main

sys.exit(main())
