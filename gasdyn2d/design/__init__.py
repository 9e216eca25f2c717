"""Floor 3: design tools (sections and their loads, intakes)."""
