"""Dock panels of the main window: layers, junction inspector, findings, properties, fleet."""
