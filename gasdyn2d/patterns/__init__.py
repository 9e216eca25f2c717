"""Floor 2: coupled wave patterns (the region graph and its ready problems)."""
