"""``python -m windsheet.cli``: the windsheet command."""

import sys

from windsheet.cli.app import main

sys.exit(main())
