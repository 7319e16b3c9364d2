"""The critical-path engine: calendars, progress, the passes and their results."""
