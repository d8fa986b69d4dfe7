"""``python -m orbviz`` runs the command line."""

import sys

from orbviz.cli import main

sys.exit(main())
