"""The monitor pipeline: validated samples -> classification, margins, trends, alarms, events. No Textual here."""
