"""``python -m compiler`` is the ``anomark`` command."""
import sys

from .cli import main

sys.exit(main())
