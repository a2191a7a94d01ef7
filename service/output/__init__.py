"""Printable output: report model, text, HTML and PDF sheets, SVG and PNG charts, cautions."""
