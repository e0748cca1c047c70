"""Reading and checking job files and stock files: line-numbered errors, parts, stock on hand."""
