"""`python -m workbench` runs the camwright command line."""

import sys

from workbench.cli import main

sys.exit(main())
