"""The workbench's terminal UI (Textual): views, panels, dialogs and messages.

`workbench.app` assembles them; the numbers come from `workbench.tui.compute`,
which calls the motion core and knows nothing of Textual.
"""
