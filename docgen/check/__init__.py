"""Checks on solved results: requirements, ratings, hand estimates."""
