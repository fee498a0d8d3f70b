"""Writers: every file a run leaves in its output folder."""
