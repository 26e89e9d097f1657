"""What is planned, as data: missions (legs, profile, reserve policy) and tolerances."""
