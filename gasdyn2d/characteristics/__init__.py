"""Floor 2: the method of characteristics (unit processes, nozzles, channels, jets)."""
