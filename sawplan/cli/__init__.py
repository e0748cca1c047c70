"""The thin Typer command line on top of the sawplan core."""
