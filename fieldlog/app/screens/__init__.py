"""The views (one Textual mode each) and the overlays (forms, pickers, help)."""
