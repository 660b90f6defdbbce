"""Running a calculation: recomputing a record's inputs, Monte Carlo bands and sensitivity."""
