"""Widgets shared by the views: the one-line bars and the fast row list."""
