"""The site as the office drew it: its files read, checked and turned into values."""
