"""Where the suspension point is, and how long the rope is, at time t."""
