"""Everything fieldlog prints: sheets, reports, JSON and CSV, one home for renderers."""
