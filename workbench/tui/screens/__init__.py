"""Modal dialogs: typed edits, the law list, limits, files, confirmations and help."""
