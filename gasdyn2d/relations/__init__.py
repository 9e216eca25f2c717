"""Floor 1: the relations of one wave at a time."""
