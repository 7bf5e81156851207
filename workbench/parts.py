"""Imports the modules that register project-file parts and check sections.

Each part module registers itself on import (see DEVELOPERS.md, "Adding a
part to the project file"); list it here.
"""

from . import camfile, camreport  # noqa: E402,F401  (the [[cam]] part and its check section)
from . import linkagefile, linkagereport  # noqa: E402,F401  (the [[linkage]] part, its check section and table source)
from . import linkageloads, linkageloads_report, loadstable  # noqa: E402,F401  ([linkage.loads], its check section; loads tables)
