"""A job planned section by section: cut plans, times, blades and the quote."""
