"""Reporters: turn a result into text or files; they never compute statistics."""
