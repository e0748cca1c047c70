"""Renderings of a plan: text, CSV and Markdown sheets, HTML with a drawing per bar."""
