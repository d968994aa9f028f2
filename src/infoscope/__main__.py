"""``python -m infoscope ...`` runs the command line (see :mod:`infoscope.cli`)."""
import sys

from infoscope.cli import main

sys.exit(main())
