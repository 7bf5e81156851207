"""What further parts (linkages, cams, loads) add to `check` and `table`.

* `CHECK_SECTIONS`: each `section(project)` returns
  `(json_key, json_value, rich_renderables, ok)`, or None when the project has
  nothing of that part; `check` adds it to the JSON document and the human
  report and folds `ok` into the exit code.
* `TABLE_SOURCES`: each `source(project, name, step_deg)` returns CSV text for
  a name it knows (a linkage output, a torque), or None.
* `TABLE_NAMES`: each `names(project)` lists the names its source knows, so
  that an unknown name can be answered with the known ones.
"""

from __future__ import annotations

from typing import Callable

CHECK_SECTIONS: list[Callable] = []
TABLE_SOURCES: list[Callable] = []
TABLE_NAMES: list[Callable] = []
