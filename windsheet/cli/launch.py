"""The ``windsheet`` console command: start what can start early, then run the CLI.

Kept tiny on purpose: it runs before typer, numpy or pydantic are imported.
"""

from __future__ import annotations

import sys


def main():
    """Entry point of the ``windsheet`` command."""
    from windsheet.sheets.pdf_worker import start_early

    # One traveller PDF: WeasyPrint loads in a second process from the first moment.
    start_early(sys.argv[1:])
    from .app import main as cli_main

    return cli_main()


if __name__ == "__main__":  # python -m windsheet.cli.launch, as the console command
    sys.exit(main())
